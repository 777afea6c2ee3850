/**
 * Parses what the technician typed into a reading field. A comma is accepted as the decimal mark
 * (many shops write 0,05); anything that is not a plain decimal number is NaN, so "0x10" or
 * "5 V" get the "enter a number" message instead of a silent surprise.
 */
export function parseReading(raw: string): number | undefined {
	const text = raw.trim().replace(',', '.');
	if (text === '') return undefined;
	if (!/^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$/.test(text)) return NaN;
	return Number(text);
}
