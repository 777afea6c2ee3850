// Issue 5: the editor's live check. After each keystroke (debounced) the editor runs checkFlow on
// the draft and lays the graph out again with dagre; for a 300-step flow that pair should take
// under 100 ms. Medians of 15 runs after warm-up, measured in node. Each run edits one step's
// title first, as a keystroke would, so no cached result can be reused.
import { checkFlow } from '../src/lib/flows/check';
import { setStepField } from '../src/lib/flows/edit';
import { createLayouter, layoutFlow } from '../src/lib/flows/layout';
import { parseFlow } from '../src/lib/flows/parse';
import { readdirSync, readFileSync } from 'node:fs';
import type { FlowDefinition } from '../src/lib/flows/schema';
// @ts-expect-error plain JS helper shared by the benchmarks
import { median } from './lib.mjs';

/**
 * A flow shaped like an authored one: questions and measurements, each exit pointing a few steps
 * ahead, one "dry and test again" loop per ten questions, one verdict per twenty steps at the end.
 * Deterministic (fixed LCG seed) so runs compare.
 */
function generate(size: number): FlowDefinition {
	let seed = 4242;
	const rnd = (n: number) => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) >>> 8) % n;
	const verdicts = Math.max(3, Math.floor(size / 20));
	const questions = size - verdicts;
	const id = (i: number) => `step-${i}`;
	const ahead = (i: number) => id(Math.min(size - 1, i + 1 + rnd(8)));
	const steps: FlowDefinition['steps'] = {};
	let v = 0;
	for (let i = 0; i < questions; i++) {
		const next = id(i + 1);
		if (i % 4 === 3) {
			steps[id(i)] = {
				kind: 'measure',
				title: `Reading ${i}`,
				minutes: 2,
				unit: 'A',
				domain: { min: 0 },
				ranges: [
					{ max: 0.01, next, label: 'No draw' },
					{ min: 0.01, max: 0.5, next: ahead(i), label: 'Normal' },
					{ min: 0.5, next: id(questions + (v++ % verdicts)), label: 'High' }
				]
			};
			continue;
		}
		const outcomes = [
			{ label: 'Yes, as described', next },
			{ label: 'No', next: ahead(i) }
		];
		if (i % 10 === 0) outcomes.push({ label: 'Still wet, dry and test again', next: id(i) });
		steps[id(i)] = {
			kind: i === 0 ? 'symptom' : 'test',
			title: `Question ${i}`,
			minutes: 1 + rnd(10),
			outcomes
		};
	}
	for (let k = questions; k < size; k++)
		steps[id(k)] = {
			kind: 'verdict',
			title: `Verdict ${k}`,
			verdict: { code: `verdict-${k}`, severity: 'repair', repair: '- [ ] Repair.', risks: 'Risks.' }
		};
	return { id: 'generated', title: 'Generated', summary: '', symptoms: [], start: id(0), steps };
}

function time(runs: number, fn: (i: number) => unknown, warmUp = 5): number {
	for (let i = 0; i < warmUp; i++) fn(i);
	const ms: number[] = [];
	for (let i = 0; i < runs; i++) {
		const t0 = performance.now();
		fn(i);
		ms.push(performance.now() - t0);
	}
	return median(ms);
}

const report = (name: string, ms: number, goal?: number) =>
	console.log(
		`${name}: median ${ms.toFixed(1)} ms${goal ? ` (goal < ${goal} ms) ${ms < goal ? 'OK' : 'OVER GOAL'}` : ''}`
	);

const flow = generate(300);
const first = checkFlow(flow);
if (!first.ok) throw new Error(`generated flow must pass: ${first.problems[0]?.message}`);
console.log(`generated flow: ${first.stats?.steps} steps, ${first.stats?.byKind.verdict} verdicts`);

report(
	'editor.checkFlow 300 steps',
	time(15, () => checkFlow(flow))
);

// A structural edit (steps added or removed, an answer pointed elsewhere) needs dagre again. Its
// cost grows steeply with the ranks and long arrows of this generated shape (~285 ranks), so it is
// measured once at 300 steps and with medians at smaller sizes to show the growth.
const layouter = createLayouter();
const t0 = performance.now();
const shape = layouter(flow, first.problems);
report(
	`editor.full layout after a structural edit, 300 steps, ${shape.edges.length} arrows (1 run)`,
	performance.now() - t0,
	100
);

// A keystroke in a title: check again, reuse the positions (the structure did not change).
const typeTitle = (i: number) => {
	const r = setStepField(flow, 'step-5', 'title', `Question 5${'x'.repeat(i % 7)}`);
	return r.ok ? r.definition : flow;
};
report(
	'editor.checkFlow + layout per keystroke in a title, 300 steps',
	time(15, (i) => {
		const def = typeTitle(i);
		return layouter(def, checkFlow(def).problems);
	}),
	100
);

for (const size of [25, 50, 100]) {
	const small = generate(size);
	report(
		`editor.checkFlow + full layout, generated ${size} steps`,
		time(3, () => layoutFlow(small, checkFlow(small).problems), 1),
		100
	);
}

// The shipped flows, full layout each (what a senior edits today).
const dir = new URL('../flows/', import.meta.url);
for (const name of readdirSync(dir).filter((n) => n.endsWith('.flow.yaml'))) {
	const parsed = parseFlow(readFileSync(new URL(name, dir), 'utf8'));
	if (!parsed.ok) continue;
	const def = parsed.definition;
	report(
		`editor.checkFlow + full layout ${name} (${Object.keys(def.steps).length} steps)`,
		time(15, () => layoutFlow(def, checkFlow(def).problems)),
		100
	);
}
