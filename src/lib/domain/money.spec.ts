import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	divideRoundHalfAwayFromZero,
	formatMoney,
	MAX_MINOR,
	quoteLineSchema,
	quoteTotals,
	type QuoteLine,
	type TaxSettings
} from './money';

// Every expected value in this file is hand-computed (shown beside it), not taken from the code.

const line = (unitMinor: number, quantity = 1, kind: QuoteLine['kind'] = 'parts'): QuoteLine => ({
	description: `${kind} line`,
	kind,
	quantity,
	unitMinor
});
const exclusive = (taxRateBasisPoints: number): TaxSettings => ({
	taxRateBasisPoints,
	pricesIncludeTax: false
});
const inclusive = (taxRateBasisPoints: number): TaxSettings => ({
	taxRateBasisPoints,
	pricesIncludeTax: true
});

describe('quoteTotals — prices exclude tax (hand-computed)', () => {
	const lines = [line(2500, 1, 'fee'), line(1999, 2, 'parts'), line(4500, 1, 'labour')];

	it('fee 25.00 + 2 × 19.99 + labour 45.00 at 20 %: net 109.98, tax 22.00 (21.996 rounded), gross 131.98', () => {
		const totals = quoteTotals(lines, exclusive(2000));
		expect(totals.lines.map((l) => l.lineMinor)).toEqual([2500, 3998, 4500]);
		expect(totals).toMatchObject({ netMinor: 10998, taxMinor: 2200, grossMinor: 13198 });
	});

	it('7.7 % (770 bp) on 123.45: 950.565 → 951 minor units', () => {
		expect(quoteTotals([line(12345)], exclusive(770))).toMatchObject({
			netMinor: 12345,
			taxMinor: 951,
			grossMinor: 13296
		});
	});

	it('zero rate: no tax', () => {
		expect(quoteTotals(lines, exclusive(0))).toMatchObject({
			netMinor: 10998,
			taxMinor: 0,
			grossMinor: 10998
		});
	});

	it('an empty quote is all zeros', () => {
		expect(quoteTotals([], exclusive(2000))).toEqual({ lines: [], netMinor: 0, taxMinor: 0, grossMinor: 0 });
	});
});

describe('quoteTotals — prices include tax (hand-computed)', () => {
	it('109.98 including 20 %: tax = 10998 · 2000 / 12000 = 1833 exactly, net 9165', () => {
		const lines = [line(2500, 1, 'fee'), line(1999, 2, 'parts'), line(4500, 1, 'labour')];
		expect(quoteTotals(lines, inclusive(2000))).toMatchObject({
			netMinor: 9165,
			taxMinor: 1833,
			grossMinor: 10998
		});
	});

	it('100.00 including 8.1 % (810 bp): 10000 · 810 / 10810 = 749.306… → 749, net 9251', () => {
		expect(quoteTotals([line(10000)], inclusive(810))).toMatchObject({
			netMinor: 9251,
			taxMinor: 749,
			grossMinor: 10000
		});
	});

	it('gross is always exactly the sum of the lines', () => {
		fc.assert(
			fc.property(
				fc.array(fc.tuple(fc.integer({ min: 0, max: 200_000 }), fc.integer({ min: 1, max: 5 })), {
					maxLength: 8
				}),
				fc.integer({ min: 0, max: 10_000 }),
				(rows, bp) => {
					const totals = quoteTotals(
						rows.map(([unit, qty]) => line(unit, qty)),
						inclusive(bp)
					);
					expect(totals.grossMinor).toBe(rows.reduce((sum, [unit, qty]) => sum + unit * qty, 0));
					expect(totals.netMinor + totals.taxMinor).toBe(totals.grossMinor);
					expect(Number.isInteger(totals.taxMinor)).toBe(true);
				}
			),
			{ numRuns: 300 }
		);
	});
});

describe('rounding at .5 boundaries: half away from zero, once on the total (hand-computed)', () => {
	it.each([
		[5, 1000, 1], // 0.5 → 1
		[15, 1000, 2], // 1.5 → 2
		[25, 1000, 3], // 2.5 → 3 (half-even would give 2)
		[24, 1000, 2], // 2.4 → 2
		[26, 1000, 3], // 2.6 → 3
		[125, 2000, 25] // 25.0 exactly
	])('exclusive: net %i at %i bp → tax %i', (net, bp, tax) => {
		expect(quoteTotals([line(net)], exclusive(bp)).taxMinor).toBe(tax);
	});

	it.each([
		[3, 2000, 1, 2], // 3 / 6 = 0.5 → 1
		[9, 2000, 2, 7], // 9 / 6 = 1.5 → 2
		[15, 2000, 3, 12], // 15 / 6 = 2.5 → 3 (half-even would give 2)
		[5, 10_000, 3, 2] // 100 %: 5 / 2 = 2.5 → 3
	])('inclusive: gross %i at %i bp → tax %i, net %i', (gross, bp, tax, net) => {
		expect(quoteTotals([line(gross)], inclusive(bp))).toMatchObject({
			taxMinor: tax,
			netMinor: net,
			grossMinor: gross
		});
	});

	it('tax is rounded on the total, not per line: three lines of 5 at 10 % → 2 (per line would be 3)', () => {
		expect(quoteTotals([line(5), line(5), line(5)], exclusive(1000)).taxMinor).toBe(2);
	});

	it('divideRoundHalfAwayFromZero rounds halves away from zero in both directions', () => {
		expect(divideRoundHalfAwayFromZero(5n, 2n)).toBe(3n);
		expect(divideRoundHalfAwayFromZero(-5n, 2n)).toBe(-3n);
		expect(divideRoundHalfAwayFromZero(7n, 3n)).toBe(2n);
		expect(divideRoundHalfAwayFromZero(-7n, 3n)).toBe(-2n);
		expect(() => divideRoundHalfAwayFromZero(1n, 0n)).toThrow(RangeError);
	});
});

describe('refusing bad amounts', () => {
	it.each<[string, QuoteLine]>([
		['negative price', line(-100)],
		['fractional minor units', line(12.5)],
		['NaN price', line(Number.NaN)],
		['zero quantity', line(100, 0)],
		['fractional quantity', line(100, 1.5)],
		['a line price above the limit', line(MAX_MINOR + 1)],
		['a line total above the limit', line(MAX_MINOR, 2)],
		['an empty description', { ...line(100), description: '  ' }],
		['an unknown kind', { ...line(100), kind: 'tip' as QuoteLine['kind'] }]
	])('%s is a RangeError', (_label, bad) => {
		expect(() => quoteTotals([bad], exclusive(2000))).toThrow(RangeError);
	});

	it('a quote total above the limit is refused, also when tax pushes it over', () => {
		expect(() => quoteTotals([line(MAX_MINOR / 2), line(MAX_MINOR / 2 + 1)], exclusive(0))).toThrow(
			RangeError
		);
		expect(() => quoteTotals([line(MAX_MINOR)], exclusive(1))).toThrow(/exceeds/);
		expect(quoteTotals([line(MAX_MINOR)], inclusive(2000)).grossMinor).toBe(MAX_MINOR);
	});

	it.each([-1, 10_001, 20.5, Number.NaN])('tax rate %s bp is a RangeError', (bp) => {
		expect(() => quoteTotals([line(100)], exclusive(bp))).toThrow(RangeError);
	});

	it('quoteLineSchema gives forms field errors for the same rules', () => {
		const result = quoteLineSchema.safeParse({
			description: 'Screen',
			kind: 'parts',
			quantity: 1,
			unitMinor: -5
		});
		expect(result.success).toBe(false);
		expect(result.error?.issues[0].path).toEqual(['unitMinor']);
	});
});

describe('formatMoney (Intl.NumberFormat; expected strings follow CLDR conventions)', () => {
	it('uses the currency’s decimals and the locale’s separators', () => {
		expect(formatMoney(123456, 'EUR', 'en-GB')).toBe('€1,234.56');
		expect(formatMoney(123456, 'EUR', 'de-DE')).toBe('1.234,56\u00a0€');
		expect(formatMoney(1234, 'JPY', 'en-US')).toBe('¥1,234');
		expect(formatMoney(1234, 'BHD', 'en-US')).toBe('BHD\u00a01.234');
	});

	it('small and negative amounts (refunds) keep their leading zeros and sign', () => {
		expect(formatMoney(5, 'EUR', 'en-GB')).toBe('€0.05');
		expect(formatMoney(0, 'EUR', 'en-GB')).toBe('€0.00');
		expect(formatMoney(-500, 'EUR', 'en-GB')).toBe('-€5.00');
	});

	it('refuses fractional minor units and unknown currencies', () => {
		expect(() => formatMoney(1.5, 'EUR', 'en-GB')).toThrow(RangeError);
		expect(() => formatMoney(100, 'EURO', 'en-GB')).toThrow(RangeError);
	});
});
