/**
 * Quote form input (isomorphic): amounts are typed in major units ("49.50") and become integer
 * minor units here by string arithmetic — never through a float — with field errors in words.
 */
import { MAX_MINOR, quoteLineKinds, type QuoteLine } from '$lib/domain/money';

/** How many decimals the currency has (EUR 2, JPY 0, BHD 3), from Intl. */
export function currencyDigits(currency: string): number {
	return (
		new Intl.NumberFormat('en', { style: 'currency', currency }).resolvedOptions().maximumFractionDigits ?? 2
	);
}

export type Parsed<T> = { ok: true; value: T } | { ok: false; error: string };

/** "49.50" / "49,5" / "49" → 4950 for a two-decimal currency. */
export function parseAmount(raw: string, currency: string): Parsed<number> {
	const text = raw.trim().replace(/\s/g, '');
	if (!text) return { ok: false, error: 'Enter a price.' };
	if (/^-/.test(text)) return { ok: false, error: 'A price cannot be negative.' };
	const digits = currencyDigits(currency);
	const match = /^(\d+)(?:[.,](\d*))?$/.exec(text);
	if (!match) return { ok: false, error: 'Enter the price as a number, e.g. 49.50.' };
	const [, whole, fraction = ''] = match;
	if (fraction.length > digits)
		return {
			ok: false,
			error: digits === 0 ? `${currency} has no decimals.` : `At most ${digits} decimals.`
		};
	const minor = BigInt(whole) * 10n ** BigInt(digits) + BigInt(fraction.padEnd(digits, '0') || '0');
	if (minor > BigInt(MAX_MINOR))
		return { ok: false, error: 'That price is beyond any phone repair; check it.' };
	return { ok: true, value: Number(minor) };
}

/** Minor units back to the typed form ("4950" → "49.50"), for editing a saved line. */
export function formatAmountInput(minor: number, currency: string): string {
	const digits = currencyDigits(currency);
	if (digits === 0) return String(minor);
	const s = String(minor).padStart(digits + 1, '0');
	return `${s.slice(0, -digits)}.${s.slice(-digits)}`;
}

export type RawLine = { description: string; kind: string; quantity: string; unit: string };
export type LineErrors = Partial<Record<keyof RawLine, string>>;

export const kindLabels: Record<(typeof quoteLineKinds)[number], string> = {
	fee: 'Diagnostic fee',
	parts: 'Parts',
	labour: 'Labour'
};

/** Checks every typed line; returns the lines in minor units or an error per line and field. */
export function parseLines(
	raw: RawLine[],
	currency: string
): { ok: true; lines: QuoteLine[] } | { ok: false; errors: Record<number, LineErrors>; form?: string } {
	const errors: Record<number, LineErrors> = {};
	const lines: QuoteLine[] = [];
	const blank = (r: RawLine) => !r.description.trim() && !r.unit.trim();
	const count = raw.filter((r) => !blank(r)).length;
	if (count === 0) return { ok: false, errors, form: 'Add at least one line.' };
	if (count > 40) return { ok: false, errors, form: 'At most 40 lines.' };
	// Errors are keyed by the row's index in the form, so they show beside the right row.
	raw.forEach((r, i) => {
		if (blank(r)) return;
		const e: LineErrors = {};
		const description = r.description.trim();
		if (!description) e.description = 'Say what the line is for.';
		else if (description.length > 200) e.description = 'At most 200 characters.';
		if (!(quoteLineKinds as readonly string[]).includes(r.kind)) e.kind = 'Choose fee, parts or labour.';
		const q = r.quantity.trim();
		const quantity = /^\d+$/.test(q) ? Number(q) : NaN;
		if (!Number.isInteger(quantity) || quantity < 1) e.quantity = 'A whole number, 1 or more.';
		else if (quantity > 1000) e.quantity = 'At most 1000.';
		const unit = parseAmount(r.unit, currency);
		if (!unit.ok) e.unit = unit.error;
		else if (Number.isInteger(quantity) && quantity * unit.value > MAX_MINOR)
			e.unit = 'This line’s total is beyond any phone repair; check it.';
		if (Object.keys(e).length) errors[i] = e;
		else
			lines.push({
				description,
				kind: r.kind as QuoteLine['kind'],
				quantity,
				unitMinor: (unit as { value: number }).value
			});
	});
	return Object.keys(errors).length ? { ok: false, errors } : { ok: true, lines };
}
