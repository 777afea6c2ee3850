// Over 300 lines on purpose: a spec: the flow machine's properties, each with its generators.
/**
 * Property test: compiled machines agree with a small reference interpreter written here from
 * the format description alone (it reads plain YAML/JSON data, not the zod types), on random
 * flows and on every shipped flow, under random walks with refused inputs and BACK.
 */
import { readdirSync, readFileSync } from 'node:fs';
import fc from 'fast-check';
import { parse } from 'yaml';
import { createActor } from 'xstate';
import { describe, expect, it } from 'vitest';
import { checkFlow } from './check';
import { compileFlow } from './machine';
import type { FlowDefinition } from './schema';

// ---- Reference interpreter ---------------------------------------------------------------

interface RawStep {
	kind: string;
	outcomes?: { label: string; next: string }[];
	ranges?: { min?: number; max?: number; next: string }[];
	domain?: { min?: number; max?: number };
	unit?: string;
}
interface RawFlow {
	start: string;
	steps: Record<string, RawStep>;
}
type RefEntry = [step: string, choice: number, value?: number];

/** Next step and chosen index for an action, or null when the step must refuse it. */
function refAct(step: RawStep, action: Action): { next: string; index: number } | null {
	if (action.type === 'answer') {
		if (step.kind !== 'symptom' && step.kind !== 'test') return null;
		const outcomes = step.outcomes!;
		const index =
			typeof action.outcome === 'string'
				? outcomes.findIndex((o) => o.label === action.outcome)
				: action.outcome;
		if (!(index >= 0 && index < outcomes.length && Number.isInteger(index))) return null;
		return { next: outcomes[index].next, index };
	}
	if (action.type === 'measure') {
		if (step.kind !== 'measure') return null;
		const v = action.value;
		if (typeof v !== 'number' || Number.isNaN(v) || v === Infinity || v === -Infinity) return null;
		if (step.domain?.min !== undefined && v < step.domain.min) return null;
		if (step.domain?.max !== undefined && v > step.domain.max) return null;
		for (let i = 0; i < step.ranges!.length; i++) {
			const r = step.ranges![i];
			if ((r.min === undefined || v >= r.min) && (r.max === undefined || v < r.max))
				return { next: r.next, index: i };
		}
		return null;
	}
	return null;
}

/** Steps from each step to the nearest verdict, to finish any walk (also on flows with loops). */
function distancesToVerdict(flow: RawFlow): Map<string, number> {
	const dist = new Map<string, number>();
	for (const [id, s] of Object.entries(flow.steps)) if (s.kind === 'verdict') dist.set(id, 0);
	for (let changed = true; changed;) {
		changed = false;
		for (const [id, s] of Object.entries(flow.steps)) {
			const nexts = [...(s.outcomes ?? []), ...(s.ranges ?? [])].map((x) => dist.get(x.next) ?? Infinity);
			const d = Math.min(Infinity, ...nexts) + 1;
			if (d < (dist.get(id) ?? Infinity)) {
				dist.set(id, d);
				changed = true;
			}
		}
	}
	return dist;
}

/** A reading that falls in range i, as the reference sees it. */
function valueIn(step: RawStep, i: number): number {
	const r = step.ranges![i];
	const lo = Math.max(r.min ?? -Infinity, step.domain?.min ?? -Infinity);
	if (lo > -Infinity) return lo;
	const hi = Math.min(r.max ?? Infinity, step.domain?.max ?? Infinity);
	return hi < Infinity ? hi - 1 : 0;
}

// ---- Walks -------------------------------------------------------------------------------

type Action =
	{ type: 'answer'; outcome: number | string } | { type: 'measure'; value: number } | { type: 'back' };

/** Abstract choices, made concrete against whatever step the walk is on. */
const choiceArb = fc.oneof(
	{
		weight: 5,
		arbitrary: fc.record({ pick: fc.nat(), label: fc.boolean() }).map((c) => ({ t: 'answer' as const, ...c }))
	},
	{
		weight: 5,
		arbitrary: fc
			.record({ pick: fc.nat(), nudge: fc.constantFrom(0, -1e-9, 1e-9, 0.5) })
			.map((c) => ({ t: 'measure' as const, ...c }))
	},
	{
		weight: 1,
		arbitrary: fc.constantFrom(NaN, Infinity, -1e12, 1e12, 3.7).map((value) => ({ t: 'raw' as const, value }))
	},
	{
		weight: 1,
		arbitrary: fc.integer({ min: -2, max: 12 }).map((outcome) => ({ t: 'index' as const, outcome }))
	},
	{ weight: 2, arbitrary: fc.constant({ t: 'back' as const }) }
);
type Choice = typeof choiceArb extends fc.Arbitrary<infer T> ? T : never;

function concrete(step: RawStep, c: Choice): Action {
	switch (c.t) {
		case 'answer': {
			const outcomes = step.outcomes ?? [{ label: 'none', next: '' }];
			const i = c.pick % outcomes.length;
			return { type: 'answer', outcome: c.label ? outcomes[i].label : i };
		}
		case 'measure': {
			const bounds = (step.ranges ?? []).flatMap((r) => [r.min, r.max]).filter((x) => x !== undefined);
			bounds.push(step.domain?.min ?? 0, step.domain?.max ?? 100);
			return { type: 'measure', value: bounds[c.pick % bounds.length] + c.nudge };
		}
		case 'raw':
			return { type: 'measure', value: c.value };
		case 'index':
			return { type: 'answer', outcome: c.outcome };
		case 'back':
			return { type: 'back' };
	}
}

function runWalk(def: FlowDefinition, raw: RawFlow, choices: Choice[]) {
	const actor = createActor(compileFlow(def)).start();
	const toVerdict = distancesToVerdict(raw);
	let state = raw.start;
	let path: RefEntry[] = [];
	const undo: { value: unknown; context: unknown }[] = [];

	const send = (action: Action) => {
		const before = actor.getSnapshot();
		if (action.type === 'back') {
			actor.send({ type: 'BACK' });
			const last = path.at(-1);
			if (last) {
				[state, path] = [last[0], path.slice(0, -1)];
				const prev = undo.pop()!;
				expect(actor.getSnapshot().value).toBe(prev.value);
				expect(actor.getSnapshot().context).toEqual(prev.context);
			}
		} else {
			actor.send(
				action.type === 'answer'
					? { type: 'ANSWER', outcome: action.outcome }
					: { type: 'MEASURE', value: action.value }
			);
			const step = refAct(raw.steps[state], action);
			if (step) {
				undo.push({ value: before.value, context: before.context });
				path = [...path, action.type === 'measure' ? [state, step.index, action.value] : [state, step.index]];
				state = step.next;
			} else expect(actor.getSnapshot()).toBe(before); // refused: nothing changed
		}
		const snap = actor.getSnapshot();
		expect(snap.value).toBe(state);
		expect(
			snap.context.path.map((e): RefEntry =>
				e.kind === 'measure' ? [e.step, e.reading.range, e.reading.value] : [e.step, e.answer.index]
			)
		).toEqual(path);
	};

	for (const c of choices) {
		if (raw.steps[state].kind === 'verdict') break;
		send(concrete(raw.steps[state], c));
	}
	// Finish on the shortest way to a verdict, so every walk ends (loops included).
	for (let guard = 0; raw.steps[state].kind !== 'verdict'; guard++) {
		expect(guard).toBeLessThan(10_000);
		const s = raw.steps[state];
		const exits = s.kind === 'measure' ? s.ranges! : s.outcomes!;
		let best = 0;
		exits.forEach((e, i) => {
			if ((toVerdict.get(e.next) ?? Infinity) < (toVerdict.get(exits[best].next) ?? Infinity)) best = i;
		});
		send(
			s.kind === 'measure' ? { type: 'measure', value: valueIn(s, best) } : { type: 'answer', outcome: best }
		);
	}
	const snap = actor.getSnapshot();
	expect(snap.status).toBe('done');
	expect(snap.output?.verdict).toBe(
		(raw.steps[state] as unknown as { verdict: { code: string } }).verdict.code
	);
	actor.stop();
}

// ---- Random valid acyclic flows ------------------------------------------------------------

/**
 * Steps 0..m-1 are questions or measurements, m..n-1 verdicts; every exit points forward, so the
 * flow is acyclic and every question reaches a verdict. Each step gets at least one way in.
 */
const flowArb = fc
	.record({
		questions: fc.integer({ min: 1, max: 12 }),
		verdicts: fc.integer({ min: 1, max: 5 }),
		random: fc.array(fc.nat({ max: 1_000_000 }), { minLength: 64, maxLength: 64 })
	})
	.map(({ questions: m, verdicts, random }) => {
		let k = 0;
		const rnd = (n: number) => random[k++ % random.length] % n;
		const n = m + verdicts;
		const id = (i: number) => `step-${i}`;
		const exits: number[][] = [];
		for (let i = 0; i < m; i++) {
			const count = 1 + rnd(4);
			exits.push(Array.from({ length: count }, () => i + 1 + rnd(n - i - 1)));
		}
		for (let j = 1; j < n; j++) if (!exits.some((e) => e.includes(j))) exits[rnd(Math.min(j, m))].push(j);

		const steps: Record<string, unknown> = {};
		for (let i = 0; i < m; i++) {
			const kind = ['symptom', 'test', 'measure'][rnd(3)];
			const base = { kind, title: `Step ${i}`, minutes: rnd(30) };
			if (kind !== 'measure') {
				steps[id(i)] = { ...base, outcomes: exits[i].map((t, o) => ({ label: `Answer ${o}`, next: id(t) })) };
				continue;
			}
			const cuts = exits[i]
				.slice(1)
				.map((_, c) => (c + 1) * (1 + rnd(5)) * 0.25)
				.sort((a, b) => a - b);
			for (let c = 1; c < cuts.length; c++) if (cuts[c] <= cuts[c - 1]) cuts[c] = cuts[c - 1] + 0.25;
			const domain = [{ min: 0 }, undefined, { min: 0, max: 1000 }][rnd(3)];
			const ranges = exits[i].map((t, r) => ({
				...(r > 0 && { min: cuts[r - 1] }),
				...(r < cuts.length && { max: cuts[r] }),
				next: id(t)
			}));
			// The trade rules (provenance, water resistance) have their own tests in rules.spec.ts.
			const provenance = [{ about: 'the cuts', basis: 'common-practice' }];
			steps[id(i)] = { ...base, unit: 'A', provenance, ...(domain && { domain }), ranges };
		}
		for (let v = m; v < n; v++)
			steps[id(v)] = {
				kind: 'verdict',
				title: `Verdict ${v}`,
				verdict: { code: `verdict-${v}`, severity: 'no-fault', repair: 'r', risks: 'k' }
			};
		return { id: 'random', title: 'Random', summary: '', symptoms: [], start: id(0), steps };
	});

const openMeasure = {
	id: 'random',
	title: 'Random',
	summary: '',
	symptoms: [],
	start: 'step-0',
	steps: {
		'step-0': {
			kind: 'measure',
			title: 'M',
			minutes: 0,
			unit: 'A',
			provenance: [{ about: 'no bounds at all', basis: 'common-practice' }],
			ranges: [{ next: 'step-1' }]
		},
		'step-1': {
			kind: 'verdict',
			title: 'V',
			verdict: { code: 'v', severity: 'no-fault', repair: 'r', risks: 'k' }
		}
	}
};

describe('compiled machines match the reference interpreter', () => {
	it('on random valid acyclic flows, every walk ends in a verdict', () => {
		fc.assert(
			fc.property(flowArb, fc.array(choiceArb, { maxLength: 40 }), (raw, choices) => {
				const checked = checkFlow(raw);
				expect(checked.problems).toEqual([]);
				expect(checked.stats?.acyclic).toBe(true);
				runWalk(checked.definition!, raw as RawFlow, choices);
			}),
			{
				numRuns: 300,
				// A measure with one open range and no domain: any finite reading goes on.
				examples: [[openMeasure, []]]
			}
		);
	});

	const dir = new URL('../../../flows/', import.meta.url);
	const shipped = readdirSync(dir).filter((n) => n.endsWith('.flow.yaml'));
	it.each(shipped)('on the shipped flow %s', (name) => {
		const raw = parse(readFileSync(new URL(name, dir), 'utf8')) as RawFlow;
		const checked = checkFlow(raw);
		expect(checked.problems).toEqual([]);
		fc.assert(
			fc.property(fc.array(choiceArb, { maxLength: 60 }), (choices) =>
				runWalk(checked.definition!, raw, choices)
			),
			{ numRuns: 150 }
		);
	});
});
