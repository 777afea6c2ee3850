// Issue 5: the editor's live check. After each keystroke (debounced) the editor runs checkFlow on
// the draft and lays the graph out; for a 300-step flow that pair should take under 100 ms,
// measured in node. Medians of 15 runs after warm-up. Each run edits the draft first, as a
// keystroke would, so no cached check can be reused.
//
// How the editor keeps to it (src/lib/flows/layout.ts, createLayouter): positions are cached by
// structure, so typing in a title or body reuses them; a structural change (an answer re-pointed, a
// step added or deleted) of a flow over 30 steps gets patched positions at once (patchPlacement:
// old nodes stay, new ones go beside their neighbours) while dagre runs in a web worker; its
// positions replace the patched ones when they arrive. Dagre itself is measured last: it is the
// worker's time, not the keystroke's.
import { readdirSync, readFileSync } from 'node:fs';
import { checkFlow } from '../src/lib/flows/check';
import { addStep, deleteStep, setExit, setStepField, type EditResult } from '../src/lib/flows/edit';
import { createLayouter, layoutFlow, placeFlow } from '../src/lib/flows/layout';
import { parseFlow } from '../src/lib/flows/parse';
import type { FlowDefinition } from '../src/lib/flows/schema';
import { generateFlow } from './generate-flow';
// @ts-expect-error plain JS helper shared by the benchmarks
import { median } from './lib.mjs';

function time(runs: number, fn: (i: number) => unknown, warmUp = 5): number {
	for (let i = 0; i < warmUp; i++) fn(i);
	const ms: number[] = [];
	for (let i = 0; i < runs; i++) {
		const t0 = performance.now();
		fn(runs + i);
		ms.push(performance.now() - t0);
	}
	return median(ms);
}

const report = (name: string, ms: number, goal?: number) =>
	console.log(
		`${name}: median ${ms.toFixed(1)} ms${goal ? ` (goal < ${goal} ms) ${ms < goal ? 'OK' : 'OVER GOAL'}` : ''}`
	);

const must = (r: EditResult) => {
	if (!r.ok) throw new Error(r.message);
	return r.definition;
};

const flow = generateFlow(300);
const first = checkFlow(flow);
if (!first.ok) throw new Error(`generated flow must pass: ${first.problems[0]?.message}`);
console.log(`generated flow: ${first.stats?.steps} steps, ${first.stats?.byKind.verdict} verdicts`);

report(
	'editor.checkFlow 300 steps',
	time(15, () => checkFlow(flow))
);

// The editor's layouter with a background placer that never answers during the measurement (the
// worker's work is not on the keystroke's path). It starts from dagre's positions, as the editor
// does once the worker has answered for the opened draft.
const never = () => new Promise<never>(() => {});
const dagrePlaced = placeFlow(flow);
let asked = 0;
const layouter = createLayouter({
	place: () => (asked++ === 0 ? Promise.resolve(dagrePlaced) : never())
});
layouter(flow);
await new Promise((r) => setTimeout(r, 0));
if (layouter(flow).provisional) throw new Error('the opened draft should have dagre positions');

const keystroke = (name: string, edit: (i: number) => FlowDefinition) =>
	report(
		`editor.checkFlow + layout per keystroke, 300 steps: ${name}`,
		time(15, (i) => {
			const def = edit(i);
			return layouter(def, checkFlow(def).problems);
		}),
		100
	);

keystroke('typing in a title', (i) =>
	must(setStepField(flow, 'step-5', 'title', `Question 5${'x'.repeat(i % 7)}`))
);
const questions = Object.keys(flow.steps).filter((id) => flow.steps[id].kind === 'test');
keystroke('an answer re-pointed (structural)', (i) =>
	must(setExit(flow, questions[i % questions.length], 1, { next: 'step-299' }))
);
keystroke('an answer pointed at a missing step (structural)', (i) =>
	must(setExit(flow, questions[i % questions.length], 0, { next: `nowhere-${i}` }))
);
keystroke('a step added (structural)', (i) => must(addStep(flow, 'test', questions[i % questions.length])));
keystroke('a step deleted with its references (structural)', (i) =>
	must(deleteStep(flow, questions[(i * 7) % questions.length], { force: true }))
);

// Dagre: what the worker does after a structural change, off the page's thread. Its cost follows
// the arrows' lengths in ranks (this flow's verdicts are reached from all along it), so it is
// measured once at 300 steps and with medians at smaller sizes to show the growth.
const t0 = performance.now();
const shape = layoutFlow(flow, first.problems);
report(
	`editor.dagre full layout in the worker, 300 steps, ${shape.edges.length} arrows (1 run)`,
	performance.now() - t0
);
for (const size of [25, 50, 100]) {
	const small = generateFlow(size);
	report(
		`editor.checkFlow + dagre full layout, generated ${size} steps${size <= 30 ? ' (in place: at most 30 steps)' : ' (worker)'}`,
		time(3, () => layoutFlow(small, checkFlow(small).problems), 1),
		size <= 30 ? 100 : undefined
	);
}

// The shipped flows, dagre in place each (what a senior edits today; all under 30 steps).
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
