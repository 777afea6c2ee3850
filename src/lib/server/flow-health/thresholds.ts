/**
 * When a step "stands out" on the flow-health page and on a senior's Today. Every number here is
 * Tidemark's own choice — common practice of ours, no published source — picked so that a step is
 * flagged only when the evidence is clear at a shop's small counts: shares must hold at the lower
 * end of their Wilson 95 % interval, and each rule needs a minimum number of runs. Change them here
 * only; the page, Today and the specs all read this object.
 */
export const STANDOUT = {
	/** Fewer runs than this at a step: its revisions, times and abandons are shown but never flagged. */
	minRuns: 10,
	/** Answers revised (BACK): at least this share of the runs that answered, and the interval's lower end at least `lower`. */
	revised: { share: 0.3, lower: 0.15 },
	/**
	 * Time: the median at least `medianRatio` × the step's expected minutes and `extraMinutes` over
	 * it; or the 90th percentile at least `p90Ratio` × expected and `p90ExtraMinutes` over it.
	 */
	slow: { medianRatio: 2, extraMinutes: 2, p90Ratio: 4, p90ExtraMinutes: 10 },
	/** Abandoned here: at least `count` runs, `share` of the runs that reached the step, lower end ≥ `lower`. */
	abandoned: { count: 3, share: 0.1, lower: 0.05 },
	/**
	 * Overturned verdicts: at least `count` on paths through the step, and the interval's lower end
	 * of "overturned among judged verdicts through here" above the version's overall overturned
	 * share — every path passes the first step, so being on a path is not enough by itself.
	 */
	overturned: { count: 2 }
} as const;
