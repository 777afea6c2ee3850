import { describe, expect, it } from 'vitest';
import { risingVerdicts } from './rising';
import type { TrendResponse, TrendWeek } from './types';

// Check values: Wilson 95 % intervals from Newcombe (1998) Statistics in Medicine 17:857–872,
// Wilson column (the same table src/lib/domain/stats.spec.ts checks): 81/263 → 0.2553–0.3662,
// 15/148 → 0.0624–0.1605.

/** `total` verdicts of each code spread as evenly as whole numbers allow over `n` weeks. */
function weeks(n: number, totals: Record<string, number>, from = 0): TrendWeek[] {
	return Array.from({ length: n }, (_, i) => {
		const verdicts: Record<string, number> = {};
		for (const [code, total] of Object.entries(totals))
			verdicts[code] = Math.floor((total * (i + 1)) / n) - Math.floor((total * i) / n);
		const runs = Object.values(verdicts).reduce((a, b) => a + b, 0);
		const day = new Date(Date.UTC(2026, 0, 5 + 7 * (from + i))).toISOString().slice(0, 10);
		return { week: day, jobs: runs, runs, abandoned: 0, verdicts };
	});
}

/** Twelve weeks before, then the last four. */
function trend(before: Record<string, number>, recent: Record<string, number>): TrendResponse {
	const codes = [...new Set([...Object.keys(before), ...Object.keys(recent)])];
	return { weeks: [...weeks(12, before), ...weeks(4, recent, 12)], verdictCodes: codes };
}

describe('risingVerdicts', () => {
	it('words a rise whose recent interval lies wholly above the earlier share as clear (81/263 against 20 %)', () => {
		const [r, ...rest] = risingVerdicts(trend({ corrosion: 120, other: 480 }, { corrosion: 81, other: 182 }));
		expect(rest).toEqual([]);
		expect(r).toMatchObject({ code: 'corrosion', k: 81, n: 263, earlier: 0.2, clear: true });
		expect(r.share).toBeCloseTo(81 / 263, 12);
		expect(r.now.lower.toFixed(4)).toBe('0.2553'); // Newcombe (1998), Wilson column
		expect(r.now.upper.toFixed(4)).toBe('0.3662'); // Newcombe (1998), Wilson column
	});

	it('keeps a rise inside the earlier share as "could be chance" (15/148 against 8 %)', () => {
		const [r] = risingVerdicts(trend({ short: 40, other: 460 }, { short: 15, other: 133 }));
		expect(r).toMatchObject({ code: 'short', k: 15, n: 148, earlier: 0.08, clear: false });
		expect(r.now.lower.toFixed(4)).toBe('0.0624'); // Newcombe (1998): below 0.08, so not clear
		expect(r.now.upper.toFixed(4)).toBe('0.1605');
	});

	it('leaves out falling verdicts and rises of fewer than three, and gives at most three, largest rise first', () => {
		const rising = risingVerdicts(
			trend(
				{ a: 100, b: 100, c: 100, d: 100, e: 100, falling: 200, few: 0, other: 200 },
				{ a: 40, b: 60, c: 50, d: 30, e: 20, falling: 10, few: 2, other: 0 }
			)
		);
		expect(rising.map((r) => r.code)).toEqual(['b', 'c', 'a']);
	});

	it('says nothing without enough history: under eight weeks, or under ten verdicts on either side', () => {
		expect(risingVerdicts(undefined)).toEqual([]);
		expect(risingVerdicts({ weeks: weeks(7, { a: 70 }), verdictCodes: ['a'] })).toEqual([]);
		expect(risingVerdicts(trend({ a: 10, b: 100 }, { a: 9 }))).toEqual([]);
		expect(risingVerdicts(trend({ a: 9 }, { a: 50, b: 10 }))).toEqual([]);
	});
});
