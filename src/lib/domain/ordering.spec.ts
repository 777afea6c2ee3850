import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	expectedCost,
	expectedCostLastAssumed,
	orderByProbabilityOverCost,
	type Candidate
} from './ordering';

function permutations<T>(items: readonly T[]): T[][] {
	if (items.length <= 1) return [[...items]];
	return items.flatMap((item, i) =>
		permutations([...items.slice(0, i), ...items.slice(i + 1)]).map((rest) => [item, ...rest])
	);
}

const byId = (candidates: Candidate[], ids: string) =>
	[...ids].map((id) => candidates.find((c) => c.id === id)!);

describe('worked example, trade-reference §4 (computed by brute force over all 24 orders; Kadane & Simon 1977 cited from memory)', () => {
	const example: Candidate[] = [
		{ id: 'A', p: 0.4, cost: 20 },
		{ id: 'B', p: 0.3, cost: 5 },
		{ id: 'C', p: 0.2, cost: 4 },
		{ id: 'D', p: 0.1, cost: 1 }
	];

	it('p / cost order is D, B, C, A at 15.9 min', () => {
		const order = orderByProbabilityOverCost(example);
		expect(order.map((c) => c.id).join('')).toBe('DBCA');
		expect(expectedCost(order)).toBeCloseTo(15.9, 10);
	});

	it('most likely first (A, B, C, D) costs 24.3; cheapest first (D, C, B, A) 16.1', () => {
		expect(expectedCost(byId(example, 'ABCD'))).toBeCloseTo(24.3, 10);
		expect(expectedCost(byId(example, 'DCBA'))).toBeCloseTo(16.1, 10);
	});

	it('over all 24 orders the best is 15.9 and the worst 24.5', () => {
		const costs = permutations(example).map(expectedCost);
		expect(costs).toHaveLength(24);
		expect(Math.min(...costs)).toBeCloseTo(15.9, 10);
		expect(Math.max(...costs)).toBeCloseTo(24.5, 10);
	});
});

describe('the variant matters (trade-reference §4 caveat, computed)', () => {
	const caveat: Candidate[] = [
		{ id: 'A', p: 0.5, cost: 1 },
		{ id: 'B', p: 0.3, cost: 4 },
		{ id: 'C', p: 0.2, cost: 3 }
	];

	it('with the last candidate assumed, p / cost (A, B, C) costs 3.0 but A, C, B costs 2.5', () => {
		const order = orderByProbabilityOverCost(caveat);
		expect(order.map((c) => c.id).join('')).toBe('ABC');
		expect(expectedCostLastAssumed(order)).toBeCloseTo(3.0, 10);
		expect(expectedCostLastAssumed(byId(caveat, 'ACB'))).toBeCloseTo(2.5, 10);
	});

	it('with every candidate checked (the product’s variant), p / cost is still the best', () => {
		const best = Math.min(...permutations(caveat).map(expectedCost));
		expect(expectedCost(orderByProbabilityOverCost(caveat))).toBeCloseTo(best, 12);
	});
});

describe('brute force over all orders of random instances, n ≤ 6 (fast-check)', () => {
	const instance = fc
		.array(fc.record({ w: fc.integer({ min: 0, max: 1000 }), cost: fc.integer({ min: 1, max: 600 }) }), {
			minLength: 1,
			maxLength: 6
		})
		.filter((rows) => rows.some((r) => r.w > 0))
		.map((rows) => {
			const total = rows.reduce((sum, r) => sum + r.w, 0);
			return rows.map((r, i): Candidate => ({ id: String(i), p: r.w / total, cost: r.cost / 10 }));
		});

	it('no order is cheaper than p / cost when every candidate is checked', () => {
		fc.assert(
			fc.property(instance, (candidates) => {
				const ours = expectedCost(orderByProbabilityOverCost(candidates));
				const best = Math.min(...permutations(candidates).map(expectedCost));
				expect(ours).toBeLessThanOrEqual(best + 1e-9 * Math.max(1, best));
			}),
			{ numRuns: 300 }
		);
	});

	it('expectedCost equals the mean cost over which candidate is the fault', () => {
		fc.assert(
			fc.property(instance, (candidates) => {
				// If candidate k is the fault, checks 1..k are paid: Σ_k p_k · Σ_{j≤k} c_j.
				let paid = 0;
				let mean = 0;
				for (const c of candidates) {
					paid += c.cost;
					mean += c.p * paid;
				}
				expect(expectedCost(candidates)).toBeCloseTo(mean, 9);
			}),
			{ numRuns: 300 }
		);
	});
});

describe('ordering details', () => {
	it('keeps the given order for equal ratios, even when binary rounding differs (0.3/3 vs 0.1/1)', () => {
		const tie: Candidate[] = [
			{ id: 'first', p: 0.3, cost: 3 },
			{ id: 'second', p: 0.1, cost: 1 },
			{ id: 'third', p: 0.2, cost: 2 }
		];
		expect(orderByProbabilityOverCost(tie).map((c) => c.id)).toEqual(['first', 'second', 'third']);
		expect(orderByProbabilityOverCost([...tie].reverse()).map((c) => c.id)).toEqual([
			'third',
			'second',
			'first'
		]);
	});

	it('keeps extra fields and does not modify the input', () => {
		const input = [
			{ id: 'x', p: 0.2, cost: 10, title: 'slow' },
			{ id: 'y', p: 0.2, cost: 1, title: 'quick' }
		];
		const order = orderByProbabilityOverCost(input);
		expect(order[0].title).toBe('quick');
		expect(input[0].id).toBe('x');
	});

	it('an empty list costs nothing; probabilities may sum to less than 1', () => {
		expect(orderByProbabilityOverCost([])).toEqual([]);
		expect(expectedCost([])).toBe(0);
		expect(
			expectedCost([
				{ id: 'a', p: 0.25, cost: 4 },
				{ id: 'b', p: 0.25, cost: 2 }
			])
		).toBeCloseTo(5.5, 12);
	});

	it.each<[string, Candidate[]]>([
		['negative p', [{ id: 'a', p: -0.1, cost: 1 }]],
		['p above 1', [{ id: 'a', p: 1.5, cost: 1 }]],
		['zero cost', [{ id: 'a', p: 0.5, cost: 0 }]],
		['NaN cost', [{ id: 'a', p: 0.5, cost: Number.NaN }]],
		[
			'probabilities above 1 in total',
			[
				{ id: 'a', p: 0.6, cost: 1 },
				{ id: 'b', p: 0.6, cost: 1 }
			]
		]
	])('refuses %s with a RangeError', (_label, candidates) => {
		expect(() => orderByProbabilityOverCost(candidates)).toThrow(RangeError);
		expect(() => expectedCost(candidates)).toThrow(RangeError);
	});
});
