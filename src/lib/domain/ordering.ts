/**
 * Which isolation test to try first. Single-fault model: exactly one of the candidates is at fault
 * with probability p (history says how often), checking a candidate costs `cost` (its steps' minutes)
 * and is conclusive, and we stop at the fault. Checking in decreasing p / cost minimises the expected
 * cost (Kadane & Simon 1977, Ann. Statist. 5:237–255 — citation from memory; see also Heckerman,
 * Breese & Rommelse 1995, "Decision-theoretic troubleshooting"). Background: trade-reference §4.
 *
 * Variant used by the product: EVERY CANDIDATE IS CHECKED, including the last one (a technician
 * confirms the fault before repairing, rather than assuming it). Caveat from trade-reference §4: if
 * the last candidate were assumed faulty without a check, p / cost would not always be optimal
 * (p = .5/.3/.2, cost = 1/4/3: p / cost costs 3.0, another order 2.5). `expectedCostLastAssumed`
 * exists only to show that difference in tests and to answer "why not skip the last check?".
 */

export interface Candidate {
	id: string;
	/** Probability that this candidate holds the fault, in [0, 1]; together at most 1. */
	p: number;
	/** Cost of checking it (minutes), > 0. */
	cost: number;
}

/** Ratios this close count as equal, so 0.3 / 3 and 0.1 / 1 tie despite binary rounding. */
const RELATIVE_TIE = 1e-12;

function validate(candidates: readonly Candidate[]): void {
	let total = 0;
	for (const { id, p, cost } of candidates) {
		if (!(Number.isFinite(p) && p >= 0 && p <= 1))
			throw new RangeError(`candidate ${id}: p must be in [0, 1] (got ${p})`);
		if (!(Number.isFinite(cost) && cost > 0))
			throw new RangeError(`candidate ${id}: cost must be > 0 (got ${cost})`);
		total += p;
	}
	// Probabilities from history may cover only some causes (sum < 1), never more than certainty.
	if (total > 1 + 1e-9) throw new RangeError(`probabilities add up to ${total}, more than 1`);
}

/** The candidates in decreasing p / cost; equal ratios keep their given order (stable). */
export function orderByProbabilityOverCost<T extends Candidate>(candidates: readonly T[]): T[] {
	validate(candidates);
	return [...candidates].sort((a, b) => {
		const ra = a.p / a.cost;
		const rb = b.p / b.cost;
		if (Math.abs(ra - rb) <= RELATIVE_TIE * Math.max(ra, rb)) return 0;
		return rb - ra;
	});
}

/**
 * Expected cost of checking in `order`, every candidate checked: Σ cost_k · (1 − Σ_{j<k} p_j), i.e.
 * each check is paid for only if no earlier check found the fault.
 */
export function expectedCost(order: readonly Candidate[]): number {
	validate(order);
	let cost = 0;
	let reached = 1;
	for (const candidate of order) {
		cost += candidate.cost * reached;
		reached -= candidate.p;
	}
	return cost;
}

/** Expected cost when the last candidate is assumed faulty without being checked (not the product's rule). */
export function expectedCostLastAssumed(order: readonly Candidate[]): number {
	validate(order);
	return expectedCost(order.slice(0, -1));
}
