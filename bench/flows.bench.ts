// Issue 3: checkFlow on a generated 2,000-step flow (goal <= 50 ms) and compileFlow on the same.
// Issue 5: checking a 300-step flow while editing (goal < 100 ms). Medians of 15 runs after warm-up.
import { stringify } from 'yaml';
import { checkFlow } from '../src/lib/flows/check';
import { compileFlow } from '../src/lib/flows/machine';
import { checkFlowText, parseFlow } from '../src/lib/flows/parse';
import type { FlowDefinition } from '../src/lib/flows/schema';
// @ts-expect-error plain JS helper shared by the benchmarks
import { median } from './lib.mjs';

/**
 * A flow shaped like an authored one but large: questions and measurements in layers, every
 * exit pointing a few steps ahead, one in ten questions with a "dry and test again" loop, and
 * one verdict per twenty steps at the end,
 * each reached from some measurement. Deterministic (fixed LCG seed) so runs compare.
 */
function generate(size: number): FlowDefinition {
	let seed = 12345;
	const rnd = (n: number) => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) >>> 8) % n;
	const verdicts = Math.max(3, Math.floor(size / 20));
	const questions = size - verdicts;
	const id = (i: number) => `step-${i}`;
	const ahead = (i: number) => id(Math.min(size - 1, i + 1 + rnd(8)));
	const steps: FlowDefinition['steps'] = {};
	let nextVerdict = 0; // round-robin so that every verdict is reachable
	for (let i = 0; i < questions; i++) {
		const next = i + 1 < questions ? id(i + 1) : id(questions);
		if (i % 4 === 3) {
			steps[id(i)] = {
				kind: 'measure',
				title: `Reading ${i}`,
				minutes: 2,
				unit: 'A',
				domain: { min: 0 },
				ranges: [
					{ max: 0.01, next, label: 'None' },
					{ min: 0.01, max: 0.5, next: ahead(i), label: 'Normal' },
					{ min: 0.5, next: id(questions + (nextVerdict++ % verdicts)), label: 'High' }
				]
			};
			continue;
		}
		const outcomes = [
			{ label: 'Yes', next },
			{ label: 'No', next: ahead(i) }
		];
		if (i % 10 === 0) outcomes.push({ label: 'Still wet, dry and test again', next: id(i) });
		steps[id(i)] = {
			kind: i === 0 ? 'symptom' : 'test',
			title: `Question ${i}`,
			minutes: 1 + rnd(10),
			cautions: i % 7 === 0 ? ['battery', 'esd'] : undefined,
			outcomes
		};
	}
	for (let v = questions; v < size; v++)
		steps[id(v)] = {
			kind: 'verdict',
			title: `Verdict ${v}`,
			verdict: { code: `verdict-${v}`, severity: 'repair', repair: 'Repair.', risks: 'Risks.' }
		};
	return { id: 'generated', title: 'Generated', summary: '', symptoms: [], start: id(0), steps };
}

function time(runs: number, fn: () => unknown): number {
	for (let i = 0; i < 5; i++) fn(); // warm-up: JIT, zod's lazy schema set-up
	const ms: number[] = [];
	for (let i = 0; i < runs; i++) {
		const t0 = performance.now();
		fn();
		ms.push(performance.now() - t0);
	}
	return median(ms);
}

function report(name: string, ms: number, goal?: string) {
	const verdict = goal
		? ` (goal ${goal} ms) ${ms <= Number(goal.replace(/[^\d.]/g, '')) ? 'OK' : 'OVER GOAL'}`
		: '';
	console.log(`${name}: median ${ms.toFixed(1)} ms${verdict}`);
}

const big = generate(2000);
const check = checkFlow(big);
if (!check.ok) throw new Error(`generated flow must pass: ${check.problems[0]?.message}`);
console.log(
	`generated flow: ${check.stats?.steps} steps, ${check.stats?.verdicts.length} verdicts, acyclic ${check.stats?.acyclic}`
);

report(
	'flows.checkFlow 2000 steps',
	time(15, () => checkFlow(big)),
	'<= 50'
);
report(
	'flows.compileFlow 2000 steps',
	time(15, () => compileFlow(big))
);
const bigText = stringify(big);
report(
	`flows.parseFlow 2000 steps (${Math.round(bigText.length / 1024)} KiB of YAML)`,
	time(15, () => parseFlow(bigText))
);

const small = generate(300);
report(
	'flows.checkFlow 300 steps',
	time(15, () => checkFlow(small)),
	'< 100'
);
const smallText = stringify(small);
report(
	`flows.parseFlow + checkFlow 300 steps from YAML (${Math.round(smallText.length / 1024)} KiB)`,
	time(15, () => checkFlowText(smallText)),
	'< 100'
);
