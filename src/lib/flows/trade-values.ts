/**
 * Handbook values that flows and cautions quote, each with its source, and a scanner that finds
 * such quotes in a text and judges each against the table. Used by trade-values.spec.ts to keep
 * every shipped flow honest: a quote that is not in the table fails, so a new value is added here
 * with its source before a flow may quote it. Values from /work/shared/docs/trade-reference.md.
 */

export interface Quote {
	/** What was quoted, e.g. "MSL 3 bake". */
	what: string;
	/** The words as found in the text. */
	found: string;
	ok: boolean;
	/** What the table allows, with its source. */
	expected: string;
}

const J_STD_033 =
	'IPC/JEDEC J-STD-033, bake before rework of a saturated part up to 1.4 mm thick at 125 °C (published)';
/** Hours at 125 °C by moisture sensitivity level. */
export const BAKE_HOURS_125C: Record<string, number> = { '2a': 5, '3': 9, '4': 11, '5': 12, '5a': 16 };

const J_STD_006 = 'handbook values, J-STD-006 notes call them informative';
/** Solidus and liquidus (°C); a quoted melting figure must lie between them. */
export const ALLOYS: Record<string, { solidus: number; liquidus: number; note?: string }> = {
	Sn63Pb37: { solidus: 183, liquidus: 183 },
	// Sources differ on the liquidus (188–191 °C): accept the range.
	Sn60Pb40: { solidus: 183, liquidus: 191, note: 'liquidus 188–191, sources differ' },
	Sn42Bi58: { solidus: 138, liquidus: 138 },
	Sn42Bi57Ag1: { solidus: 137, liquidus: 139 },
	'Sn96.5Ag3.0Cu0.5': { solidus: 217, liquidus: 220 },
	'Sn96.5Ag3.5': { solidus: 221, liquidus: 221 },
	'Sn99.3Cu0.7': { solidus: 227, liquidus: 227 }
};

const J_STD_020 =
	'IPC/JEDEC J-STD-020 classification (peak) temperatures: Pb-free 260/250/245 °C (published); Sn-Pb 235/220 °C in revision D (from memory), 240/225 °C in revision C (published)';
export const CLASSIFICATION_PB_FREE = [260, 250, 245];
export const CLASSIFICATION_SN_PB = [235, 220, 240, 225];

const NIOSH_IPA = 'NIOSH Pocket Guide to Chemical Hazards, isopropyl alcohol (published)';
export const IPA = { flashPointC: 11.7, flashPointF: 53, lowerLimit: 2.0, upperLimit: 12.7 };

const NIOSH_HF = 'NIOSH Pocket Guide, hydrogen fluoride: REL 3 ppm TWA, 6 ppm ceiling (from memory)';
export const HF = { twa: 3, ceiling: 6 };

const NUM = String.raw`(\d+(?:\.\d+)?)`;
/** Any alloy written as its formula, e.g. Sn96.5Ag3.0Cu0.5; unknown formulas are refused. */
const ALLOY = /\bSn\d+(?:\.\d+)?(?:[A-Z][a-z]?\d+(?:\.\d+)?)+/g;

function* matches(text: string, re: RegExp) {
	for (const m of text.matchAll(re)) yield m;
}

/** Every quote of a tabled value in `text`, judged. Whitespace (YAML line folds) counts as one space. */
export function scanQuotes(raw: string): Quote[] {
	const text = raw.replace(/\s+/g, ' ');
	const out: Quote[] = [];
	const push = (what: string, found: string, ok: boolean, expected: string) =>
		out.push({ what, found, ok, expected });

	for (const m of matches(text, new RegExp(String.raw`\bMSL ?(\d[a-z]?)\b[ :,(=]*${NUM} ?h\b`, 'g'))) {
		const want = BAKE_HOURS_125C[m[1]];
		push(
			`MSL ${m[1]} bake`,
			m[0],
			want === Number(m[2]),
			`${want ?? 'no value in the table'} h (${J_STD_033})`
		);
	}
	for (const m of matches(text, new RegExp(String.raw`J-STD-033[^.;]{0,40}?${NUM} ?°C`, 'g')))
		push('J-STD-033 bake temperature', m[0], Number(m[1]) === 125, `125 °C (${J_STD_033})`);

	for (const m of matches(text, ALLOY)) {
		const after = text.slice(m.index + m[0].length);
		const temp = new RegExp(String.raw`^\D{0,30}?${NUM}(?: ?[–-] ?${NUM})? ?°C`).exec(after);
		if (!temp) continue;
		const alloy = ALLOYS[m[0]];
		const values = [temp[1], temp[2]].filter(Boolean).map(Number);
		const ok = !!alloy && values.every((v) => v >= alloy.solidus && v <= alloy.liquidus);
		const expected = alloy
			? `${alloy.solidus} / ${alloy.note ?? alloy.liquidus} °C (${J_STD_006})`
			: 'an alloy in the table: add it with its source first';
		push(`${m[0]} melting`, m[0] + temp[0], ok, expected);
	}

	for (const m of matches(
		text,
		new RegExp(String.raw`(J-STD-020|classification temperature)\D{0,60}?${NUM} ?°C`, 'gi')
	)) {
		const leadFree = /lead-free|pb-free/i.test(m[0]);
		const allowed = leadFree ? CLASSIFICATION_PB_FREE : [...CLASSIFICATION_PB_FREE, ...CLASSIFICATION_SN_PB];
		push(
			'classification temperature',
			m[0],
			allowed.includes(Number(m[2])),
			`one of ${allowed.join(', ')} °C (${J_STD_020})`
		);
	}
	for (const m of matches(text, new RegExp(String.raw`flash point\D{0,30}?${NUM} ?°([CF])`, 'gi'))) {
		const want = m[2] === 'C' ? IPA.flashPointC : IPA.flashPointF;
		push('isopropyl alcohol flash point', m[0], Number(m[1]) === want, `11.7 °C / 53 °F (${NIOSH_IPA})`);
	}
	if (/isopropyl/i.test(text))
		for (const m of matches(
			text,
			new RegExp(String.raw`(?:between|limits?) ${NUM} ?% ?(?:and|to|–|-) ?${NUM} ?%`, 'gi')
		))
			push(
				'isopropyl alcohol explosive limits',
				m[0],
				Number(m[1]) === IPA.lowerLimit && Number(m[2]) === IPA.upperLimit,
				`2.0 % to 12.7 % (${NIOSH_IPA})`
			);
	for (const m of matches(
		text,
		new RegExp(String.raw`hydrogen fluoride[^.]{0,60}?REL ${NUM} ?ppm[^.]{0,20}?${NUM} ?ppm ceiling`, 'gi')
	))
		push('hydrogen fluoride limits', m[0], Number(m[1]) === HF.twa && Number(m[2]) === HF.ceiling, NIOSH_HF);
	return out;
}
