import fc from 'fast-check';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { median, normalQuantile, percentile, wilsonInterval } from './stats';

// jstat ships no types; only the few functions used here are described.
interface JStatSubset {
	normal: { inv(p: number, mean: number, sd: number): number };
	quantiles(values: number[], ps: number[], alphap: number, betap: number): number[];
	median(values: number[]): number;
}
const { jStat } = createRequire(import.meta.url)('jstat') as { jStat: JStatSubset };

describe('wilsonInterval — Newcombe (1998) Statistics in Medicine 17:857–872, Wilson 95 % column (via trade-reference §3)', () => {
	it.each([
		[81, 263, 0.2553, 0.3662],
		[15, 148, 0.0624, 0.1605],
		[0, 20, 0.0, 0.1611],
		[1, 29, 0.0061, 0.1718]
	])('%i/%i → %f – %f to 4 decimals', (x, n, lower, upper) => {
		const interval = wilsonInterval(x, n);
		expect(interval.lower.toFixed(4)).toBe(lower.toFixed(4));
		expect(interval.upper.toFixed(4)).toBe(upper.toFixed(4));
	});

	it('uses the exact quantile, not 1.96: 0/20 upper = 0.161125 (trade-reference §3, computed; 1.96 would give 0.161130)', () => {
		expect(wilsonInterval(0, 20).upper.toFixed(6)).toBe('0.161125');
		// For x = 0 the upper bound reduces to z²/(n + z²); with z = 1.96 that is 0.161130.
		expect((1.96 ** 2 / (20 + 1.96 ** 2)).toFixed(6)).toBe('0.161130');
	});
});

describe('wilsonInterval — defined edges and validation', () => {
	it('n = 0 gives the whole range {0, 1}, not NaN (documented choice)', () => {
		expect(wilsonInterval(0, 0)).toEqual({ lower: 0, upper: 1 });
	});

	it('x = 0 has lower exactly 0 and x = n has upper exactly 1', () => {
		expect(wilsonInterval(0, 7).lower).toBe(0);
		expect(wilsonInterval(7, 7).upper).toBe(1);
	});

	it('x/n and (n−x)/n mirror each other', () => {
		const a = wilsonInterval(3, 17);
		const b = wilsonInterval(14, 17);
		expect(a.lower).toBeCloseTo(1 - b.upper, 12);
		expect(a.upper).toBeCloseTo(1 - b.lower, 12);
	});

	it('a higher confidence gives a wider interval', () => {
		const c95 = wilsonInterval(10, 40, 0.95);
		const c99 = wilsonInterval(10, 40, 0.99);
		expect(c99.lower).toBeLessThan(c95.lower);
		expect(c99.upper).toBeGreaterThan(c95.upper);
	});

	it.each<[number, number, number]>([
		[-1, 10, 0.95],
		[1.5, 10, 0.95],
		[11, 10, 0.95],
		[1, -10, 0.95],
		[1, Number.NaN, 0.95],
		[1, 10, 0],
		[1, 10, 1],
		[1, 10, 95],
		[1, 10, Number.NaN]
	])('wilsonInterval(%s, %s, %s) is a RangeError', (x, n, confidence) => {
		expect(() => wilsonInterval(x, n, confidence)).toThrow(RangeError);
	});

	it('its bounds are where the score test statistic equals z (the definition of the Wilson interval)', () => {
		const z = normalQuantile(0.975);
		fc.assert(
			fc.property(
				fc
					.integer({ min: 2, max: 5000 })
					.chain((n) => fc.tuple(fc.integer({ min: 1, max: n - 1 }), fc.constant(n))),
				([x, n]) => {
					const { lower, upper } = wilsonInterval(x, n);
					for (const p of [lower, upper]) {
						expect(Math.abs(x / n - p) / Math.sqrt((p * (1 - p)) / n)).toBeCloseTo(z, 8);
					}
					expect(lower).toBeLessThan(x / n);
					expect(upper).toBeGreaterThan(x / n);
				}
			),
			{ numRuns: 500 }
		);
	});
});

describe('normalQuantile (Wichura AS 241)', () => {
	it('z(0.975) = 1.959963984540054 (trade-reference §3) to 1e-15', () => {
		expect(Math.abs(normalQuantile(0.975) - 1.959963984540054)).toBeLessThan(1e-15);
	});

	it('matches jstat jStat.normal.inv to 1e-9 on many p in [1e-8, 1 − 1e-8] (npm reference library)', () => {
		// Outside this range jstat's own erfcinv drifts (about 3e-8 at 1e-10), so the tails are
		// checked against Python below instead.
		fc.assert(
			fc.property(fc.double({ min: 1e-8, max: 1 - 1e-8, noNaN: true }), (p) => {
				expect(Math.abs(normalQuantile(p) - jStat.normal.inv(p, 0, 1))).toBeLessThan(1e-9);
			}),
			{ numRuns: 5000 }
		);
		for (let e = -8; e <= -1; e += 0.25) {
			expect(Math.abs(normalQuantile(10 ** e) - jStat.normal.inv(10 ** e, 0, 1))).toBeLessThan(1e-9);
		}
	});

	it.each([
		[0.95, 1.6448536269514715],
		[0.995, 2.5758293035489],
		[0.9, 1.2815515655446008],
		[1e-10, -6.361340902404056],
		[1e-20, -9.262340089798405],
		[1e-100, -21.27345356096532],
		[1e-300, -37.0470962993612]
	])(
		'Φ⁻¹(%s) = %s to 1e-12 (computed with Python 3.11 statistics.NormalDist().inv_cdf, an independent AS 241)',
		(p, z) => {
			expect(Math.abs(normalQuantile(p) - z)).toBeLessThan(1e-12);
		}
	);

	it('is antisymmetric about 0.5 and monotone', () => {
		expect(normalQuantile(0.5)).toBe(0);
		fc.assert(
			fc.property(
				fc.double({ min: 1e-300, max: 0.5, noNaN: true }),
				fc.double({ min: 1e-300, max: 0.5, noNaN: true }),
				(a, b) => {
					const [lo, hi] = a <= b ? [a, b] : [b, a];
					expect(normalQuantile(lo)).toBeLessThanOrEqual(normalQuantile(hi));
					// 1 − a is exact for a ≥ 0.25 (Sterbenz); below that the subtraction itself rounds.
					if (a >= 0.25) expect(normalQuantile(1 - a)).toBeCloseTo(-normalQuantile(a), 14);
				}
			),
			{ numRuns: 1000 }
		);
	});

	it('p = 0 and 1 are ∓Infinity; outside [0, 1] or NaN is a RangeError', () => {
		expect(normalQuantile(0)).toBe(-Infinity);
		expect(normalQuantile(1)).toBe(Infinity);
		for (const bad of [-0.1, 1.1, Number.NaN]) expect(() => normalQuantile(bad)).toThrow(RangeError);
	});
});

describe('percentile and median (Hyndman & Fan type 7, as R quantile() and numpy.percentile default)', () => {
	it('matches numpy.percentile values (computed with numpy 2.4 on this machine)', () => {
		const oneToTen = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
		expect(percentile(oneToTen, 90)).toBeCloseTo(9.1, 12);
		expect(percentile(oneToTen, 50)).toBeCloseTo(5.5, 12);
		expect(percentile(oneToTen, 25)).toBeCloseTo(3.25, 12);
		expect(percentile(oneToTen, 33.3)).toBeCloseTo(3.997, 12);
		expect(percentile(oneToTen, 0)).toBe(1);
		expect(percentile(oneToTen, 100)).toBe(10);
		const durations = [12, 3, 7, 7, 41, 19, 5];
		expect(percentile(durations, 90)).toBeCloseTo(27.8, 12);
		expect(percentile(durations, 10)).toBeCloseTo(4.2, 12);
		expect(percentile(durations, 75)).toBeCloseTo(15.5, 12);
		expect(percentile([4.5], 90)).toBe(4.5);
	});

	it('agrees with jstat jStat.quantiles(values, [p], 1, 1) — type 7 — on random data (npm reference library)', () => {
		fc.assert(
			fc.property(
				fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 2, maxLength: 60 }),
				fc.double({ min: 0, max: 1, noNaN: true }),
				(values, q) => {
					const ours = percentile(values, q * 100);
					const theirs = jStat.quantiles(values, [q], 1, 1)[0];
					expect(Math.abs(ours - theirs)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(theirs)));
				}
			),
			{ numRuns: 1000 }
		);
	});

	it('median: middle value or mean of the two middle ones; agrees with jStat.median', () => {
		expect(median([5, 1, 3])).toBe(3);
		expect(median([4, 1, 3, 2])).toBe(2.5);
		fc.assert(
			fc.property(
				fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: 1, maxLength: 50 }),
				(values) => {
					expect(median(values)).toBeCloseTo(jStat.median(values), 9);
					expect(median(values)).toBeCloseTo(percentile(values, 50), 9);
				}
			),
			{ numRuns: 500 }
		);
	});

	it('does not reorder the caller’s array', () => {
		const values = [3, 1, 2];
		percentile(values, 90);
		median(values);
		expect(values).toEqual([3, 1, 2]);
	});

	it('refuses empty input, non-finite values and p outside [0, 100]', () => {
		expect(() => median([])).toThrow(RangeError);
		expect(() => percentile([], 50)).toThrow(RangeError);
		expect(() => percentile([1, Number.NaN], 50)).toThrow(RangeError);
		expect(() => median([1, Infinity])).toThrow(RangeError);
		expect(() => percentile([1, 2], 101)).toThrow(RangeError);
		expect(() => percentile([1, 2], -1)).toThrow(RangeError);
	});
});
