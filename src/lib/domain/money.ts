/**
 * Quote totals in integer minor units (cents, pence, yen): money is never a float here, so a total
 * shown to the customer, charged by the payment service and printed on the receipt is the same number.
 *
 * Rounding rule (one rule, everywhere): tax is computed ONCE on the quote's total, not per line, and
 * rounded half away from zero to a whole minor unit. Per-line rounding can drift by a unit per line
 * (three lines of 5 at 10 % → 3 per line vs 2 on the total); rounding the total keeps the tax closest
 * to the rate. Amounts are never negative, so "half away from zero" is "half up" in practice.
 *
 * - Prices exclude tax: net = Σ lines, tax = round(net · rate), gross = net + tax.
 * - Prices include tax: gross = Σ lines, tax = round(gross · rate / (1 + rate)), net = gross − tax.
 *
 * The arithmetic is BigInt so no intermediate product can lose precision, however the limits change.
 */
import { z } from 'zod';
import { text } from '$lib/schemas/text';

/** Beyond this a line or a total is a typo, not a phone repair (100,000.00 in a two-decimal currency). */
export const MAX_MINOR = 10_000_000;
const MAX_QUANTITY = 1000;
const BASIS_POINTS = 10_000n;

export const quoteLineKinds = ['fee', 'parts', 'labour'] as const;

/** Quantities are whole units; price labour per block of time (e.g. per 15 min) rather than in fractions. */
export const quoteLineSchema = z.object({
	description: text('A line’s description').trim().min(1).max(200),
	kind: z.enum(quoteLineKinds),
	quantity: z.number().int().min(1).max(MAX_QUANTITY),
	unitMinor: z.number().int().min(0).max(MAX_MINOR)
});
export type QuoteLine = z.infer<typeof quoteLineSchema>;

/** The shop's tax settings: 2000 basis points = 20 %. */
export const taxSettingsSchema = z.object({
	taxRateBasisPoints: z.number().int().min(0).max(10_000),
	pricesIncludeTax: z.boolean()
});
export type TaxSettings = z.infer<typeof taxSettingsSchema>;

export interface QuoteTotals {
	lines: (QuoteLine & { lineMinor: number })[];
	netMinor: number;
	taxMinor: number;
	grossMinor: number;
}

/** numerator / denominator rounded half away from zero, for a positive denominator. */
export function divideRoundHalfAwayFromZero(numerator: bigint, denominator: bigint): bigint {
	if (denominator <= 0n) throw new RangeError('denominator must be positive');
	const magnitude = numerator < 0n ? -numerator : numerator;
	const rounded = (2n * magnitude + denominator) / (2n * denominator);
	return numerator < 0n ? -rounded : rounded;
}

function parseOrThrow<T>(schema: z.ZodType<T>, value: unknown, what: string): T {
	const result = schema.safeParse(value);
	if (!result.success) {
		const issue = result.error.issues[0];
		throw new RangeError(`${what}: ${issue.path.join('.') || 'value'} — ${issue.message}`);
	}
	return result.data;
}

/** Totals for a quote. Bad lines or settings (negative, fractional or absurd amounts) are a RangeError. */
export function quoteTotals(lines: readonly QuoteLine[], settings: TaxSettings): QuoteTotals {
	const { taxRateBasisPoints, pricesIncludeTax } = parseOrThrow(taxSettingsSchema, settings, 'tax settings');
	const priced = lines.map((line, i) => {
		const valid = parseOrThrow(quoteLineSchema, line, `line ${i + 1}`);
		const lineMinor = valid.quantity * valid.unitMinor;
		if (lineMinor > MAX_MINOR)
			throw new RangeError(`line ${i + 1}: ${lineMinor} exceeds ${MAX_MINOR} minor units`);
		return { ...valid, lineMinor };
	});
	const sum = priced.reduce((total, line) => total + BigInt(line.lineMinor), 0n);
	const rate = BigInt(taxRateBasisPoints);
	const tax = pricesIncludeTax
		? divideRoundHalfAwayFromZero(sum * rate, BASIS_POINTS + rate)
		: divideRoundHalfAwayFromZero(sum * rate, BASIS_POINTS);
	const net = pricesIncludeTax ? sum - tax : sum;
	const gross = net + tax;
	if (gross > BigInt(MAX_MINOR))
		throw new RangeError(`quote total ${gross} exceeds ${MAX_MINOR} minor units`);
	return { lines: priced, netMinor: Number(net), taxMinor: Number(tax), grossMinor: Number(gross) };
}

/** Building a formatter costs ~100× formatting with one, and a report formats many amounts. */
const formats = new Map<string, Intl.NumberFormat>();
function currencyFormat(currency: string, locale: string | undefined): Intl.NumberFormat {
	const key = `${locale ?? ''}|${currency}`;
	let format = formats.get(key);
	if (!format) {
		format = new Intl.NumberFormat(locale, { style: 'currency', currency });
		formats.set(key, format);
	}
	return format;
}

/**
 * Formats minor units for people, e.g. formatMoney(123456, 'EUR', 'en-GB') → "€1,234.56".
 * The currency's own number of decimals comes from Intl (JPY 0, EUR 2, BHD 3), and the amount is
 * passed to Intl as an exact decimal string, so no float rounding shows. Negative amounts (refunds)
 * are allowed here.
 */
export function formatMoney(minor: number, currency: string, locale?: string): string {
	if (!Number.isSafeInteger(minor))
		throw new RangeError(`formatMoney: ${minor} is not a whole number of minor units`);
	const format = currencyFormat(currency, locale);
	const digits = format.resolvedOptions().maximumFractionDigits ?? 2;
	const sign = minor < 0 ? '-' : '';
	const padded = String(Math.abs(minor)).padStart(digits + 1, '0');
	const decimal = digits === 0 ? padded : `${padded.slice(0, -digits)}.${padded.slice(-digits)}`;
	// Intl.NumberFormat formats a decimal string exactly (ECMA-402 NumberFormat v3, Node 19+).
	return format.format(`${sign}${decimal}` as `${number}`);
}
