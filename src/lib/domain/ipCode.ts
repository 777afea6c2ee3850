/**
 * Reads an IEC 60529 protection code as people type it at the counter: "IP67", "ipx7", "IP 54",
 * "IP6X", or a dual code such as "IP65/IP68" (makers write both because 7/8 do not imply the jet
 * tests 5/6). "X" means "not stated". Optional trailing letters are accepted and ignored: the
 * additional letter A–D (access by fingers/tools), supplementary letters H/M/S/W, and the "K" of
 * road-vehicle codes such as IP69K (ISO 20653 — from memory). Second digit 9 (high-pressure hot
 * jets, added to IEC 60529 in 2013 — from memory) is read but is not an immersion rating.
 */
export interface IpCode {
	/** The code as normalised for display, e.g. "IP65/IP68". */
	code: string;
	/** First digit: 0–6 (5 dust-protected, 6 dust-tight), or null for "X". */
	solids: number | null;
	/** Every stated second digit, in the order written (empty for "IPX…X"). */
	water: number[];
	/** The immersion digit (7 or 8) if the code states one; 8 wins over 7 in a dual code. */
	immersion: 7 | 8 | null;
}

const PART = /^IP([0-6X])([0-9X])K?[A-D]?[HMSW]{0,4}$/;

/** `null` means "no rating" (empty, "none"); `'invalid'` means the text is not an IP code. */
export function parseIpCode(input: string | null | undefined): IpCode | null | 'invalid' {
	if (input === null || input === undefined) return null;
	const text = input.trim().toUpperCase().replace(/\s+/g, '');
	if (text === '' || text === 'NONE' || text === '-') return null;
	const parts = text.split(/[/,]/);
	let solids: number | null = null;
	const water: number[] = [];
	for (const part of parts) {
		const match = PART.exec(part);
		if (!match) return 'invalid';
		if (match[1] !== 'X') solids = Math.max(solids ?? 0, Number(match[1]));
		if (match[2] !== 'X') water.push(Number(match[2]));
	}
	const immersion = water.includes(8) ? 8 : water.includes(7) ? 7 : null;
	return { code: parts.join('/'), solids, water, immersion };
}
