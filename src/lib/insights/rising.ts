/**
 * "Which verdict is rising?", shared by Insights and the lead's Today: each verdict's share of
 * verdicts in the last four weeks of the trend against the twelve weeks before, both with Wilson
 * 95 % intervals. `clear` means the recent interval lies wholly above the earlier share, so chance
 * alone is an unlikely explanation. At most three, largest rise first.
 */
import { wilsonInterval } from '$lib/domain/stats';
import type { TrendResponse } from './types';

export type RisingVerdict = {
	code: string;
	share: number;
	now: { lower: number; upper: number };
	earlier: number;
	then: { lower: number; upper: number };
	k: number;
	n: number;
	clear: boolean;
};

export function risingVerdicts(trend: TrendResponse | undefined): RisingVerdict[] {
	const weeks = trend?.weeks ?? [];
	if (weeks.length < 8) return [];
	const recent = weeks.slice(-4);
	const before = weeks.slice(-16, -4);
	const total = (ws: typeof weeks) =>
		ws.reduce((s, w) => s + Object.values(w.verdicts).reduce((a, b) => a + b, 0), 0);
	const nRecent = total(recent);
	const nBefore = total(before);
	if (nRecent < 10 || nBefore < 10) return [];
	return (trend?.verdictCodes ?? [])
		.map((code) => {
			const k = recent.reduce((s, w) => s + (w.verdicts[code] ?? 0), 0);
			const j = before.reduce((s, w) => s + (w.verdicts[code] ?? 0), 0);
			const now = wilsonInterval(k, nRecent);
			return {
				code,
				share: k / nRecent,
				now,
				earlier: j / nBefore,
				then: wilsonInterval(j, nBefore),
				k,
				n: nRecent,
				clear: now.lower > j / nBefore
			};
		})
		.filter((r) => r.share > r.earlier && r.k >= 3)
		.sort((a, b) => b.share - b.earlier - (a.share - a.earlier))
		.slice(0, 3);
}
