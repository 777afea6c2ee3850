/**
 * Property tests: checkFlow's linear-time graph and range analysis against naive fixpoint and
 * brute-force references written here, on random flows with loops, broken targets and random ranges.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { checkFlow } from './check';

const verdict = (i: number) => ({
	kind: 'verdict',
	title: 'V',
	verdict: { code: `v-${i}`, severity: 'repair', repair: 'r', risks: 'k' }
});

/** Random graphs: any step may point anywhere, including itself and to steps that do not exist. */
const graphArb = fc.integer({ min: 1, max: 10 }).chain((n) =>
	fc.record({
		n: fc.constant(n),
		kinds: fc.array(fc.boolean(), { minLength: n, maxLength: n }), // true = verdict
		exits: fc.array(fc.array(fc.integer({ min: 0, max: n }), { maxLength: 3 }), {
			minLength: n,
			maxLength: n
		}),
		minutes: fc.array(fc.integer({ min: 0, max: 9 }), { minLength: n, maxLength: n })
	})
);

type Graph = { n: number; kinds: boolean[]; exits: number[][]; minutes: number[] };

function toFlow(g: Graph) {
	const steps: Record<string, unknown> = {};
	for (let i = 0; i < g.n; i++)
		steps[`s-${i}`] = g.kinds[i]
			? verdict(i)
			: {
					kind: 'test',
					title: 'T',
					minutes: g.minutes[i],
					// index n names a step that does not exist
					outcomes: g.exits[i].map((t, k) => ({ label: `a${k}`, next: `s-${t}` }))
				};
	return { id: 'g', title: 'G', summary: '', symptoms: [], start: 's-0', steps };
}

/** Naive references: repeat until nothing changes. */
function reference(g: Graph) {
	const edges = (i: number) => (g.kinds[i] ? [] : g.exits[i]);
	const known = (t: number) => t < g.n;
	const reach = new Set([0]);
	const okay = new Set<number>();
	for (let changed = true; changed;) {
		changed = false;
		for (let i = 0; i < g.n; i++) {
			for (const t of reach.has(i) ? edges(i).filter(known) : [])
				if (!reach.has(t)) {
					reach.add(t);
					changed = true;
				}
			const seed = g.kinds[i] || edges(i).length === 0 || !edges(i).every(known);
			if (!okay.has(i) && (seed || edges(i).some((t) => okay.has(t)))) {
				okay.add(i);
				changed = true;
			}
		}
	}
	// Bellman-Ford for fewest steps / minutes; a step's minutes count when leaving it.
	const steps = Array(g.n).fill(Infinity);
	const mins = Array(g.n).fill(Infinity);
	const most = Array(g.n).fill(-Infinity);
	const mostMins = Array(g.n).fill(-Infinity);
	steps[0] = mins[0] = most[0] = mostMins[0] = 0;
	for (let round = 0; round < g.n; round++)
		for (let i = 0; i < g.n; i++)
			for (const t of edges(i).filter(known)) {
				steps[t] = Math.min(steps[t], steps[i] + 1);
				mins[t] = Math.min(mins[t], mins[i] + g.minutes[i]);
				most[t] = Math.max(most[t], most[i] + 1);
				mostMins[t] = Math.max(mostMins[t], mostMins[i] + g.minutes[i]);
			}
	// Acyclic iff peeling steps without remaining exits empties the reachable part.
	const left = new Set(reach);
	for (let changed = true; changed;) {
		changed = false;
		for (const i of left)
			if (!edges(i).some((t) => left.has(t))) {
				left.delete(i);
				changed = true;
			}
	}
	return { reach, okay, steps, mins, most, mostMins, acyclic: left.size === 0 };
}

describe('checkFlow graph analysis matches naive references', () => {
	it('on random graphs with loops and broken targets', () => {
		fc.assert(
			fc.property(graphArb, (g) => {
				const result = checkFlow(toFlow(g));
				const ref = reference(g);
				const stepsWith = (code: string) =>
					result.problems
						.filter((p) => p.code === code)
						.map((p) => Number(p.step!.slice(2)))
						.sort((a, b) => a - b);
				const all = [...Array(g.n).keys()];
				expect(stepsWith('unreachable-step')).toEqual(all.filter((i) => !ref.reach.has(i)));
				expect(stepsWith('dead-end')).toEqual(all.filter((i) => !ref.okay.has(i)));
				expect(stepsWith('no-exits')).toEqual(all.filter((i) => !g.kinds[i] && g.exits[i].length === 0));
				expect(new Set(stepsWith('unknown-target'))).toEqual(
					new Set(all.filter((i) => !g.kinds[i] && g.exits[i].includes(g.n)))
				);

				const stats = result.stats!;
				expect(stats.acyclic).toBe(ref.acyclic);
				const expectedShortest: Record<string, { steps: number; minutes: number }> = {};
				for (const i of all)
					if (g.kinds[i] && ref.reach.has(i))
						expectedShortest[`v-${i}`] = { steps: ref.steps[i], minutes: ref.mins[i] };
				expect(stats.shortest).toEqual(expectedShortest);
				const reachedVerdicts = all.filter((i) => g.kinds[i] && ref.reach.has(i));
				if (!ref.acyclic) expect(stats.longest).toBeNull();
				else if (reachedVerdicts.length)
					expect(stats.longest).toEqual({
						steps: Math.max(...reachedVerdicts.map((i) => ref.most[i])),
						minutes: Math.max(...reachedVerdicts.map((i) => ref.mostMins[i]))
					});
			}),
			{ numRuns: 500 }
		);
	});
});

const bound = fc.option(fc.integer({ min: -3, max: 6 }), { nil: undefined });
const rangesArb = fc.record({
	domain: fc.option(fc.record({ min: bound, max: bound }), { nil: undefined }),
	ranges: fc.array(fc.record({ min: bound, max: bound }), { minLength: 1, maxLength: 4 })
});

describe('range coverage matches brute force', () => {
	it('reports a gap or an overlap exactly when some valid reading has no range or two', () => {
		fc.assert(
			fc.property(rangesArb, ({ domain, ranges }) => {
				const d = { min: domain?.min ?? -Infinity, max: domain?.max ?? Infinity };
				fc.pre(d.min <= d.max); // an empty domain is its own problem
				const flow = {
					id: 'r',
					title: 'R',
					summary: '',
					symptoms: [],
					start: 'm',
					steps: {
						m: {
							kind: 'measure',
							title: 'M',
							minutes: 1,
							unit: 'V',
							...(domain && { domain: JSON.parse(JSON.stringify(domain)) }),
							ranges: ranges.map((r) => ({ ...JSON.parse(JSON.stringify(r)), next: 'x' }))
						},
						x: verdict(0)
					}
				};
				const codes = checkFlow(flow).problems.map((p) => p.code);
				// Every gap or overlap starts at a bound, so probing bounds (and just around them) suffices.
				const probes = [-100, 100, ...ranges.flatMap((r) => [r.min, r.max]), d.min, d.max]
					.filter((x): x is number => x !== undefined && Number.isFinite(x))
					.flatMap((x) => [x - 0.5, x, x + 0.5])
					.filter((x) => x >= d.min && x <= d.max);
				const count = (x: number) =>
					ranges.filter((r) => x >= (r.min ?? -Infinity) && x < (r.max ?? Infinity)).length;
				expect(codes.includes('range-gap')).toBe(probes.some((x) => count(x) === 0));
				expect(codes.includes('range-overlap')).toBe(probes.some((x) => count(x) > 1));
				const empty = ranges.some((r) => (r.min ?? -Infinity) >= (r.max ?? Infinity));
				expect(codes.includes('range-empty')).toBe(empty);
			}),
			{ numRuns: 1000 }
		);
	});
});
