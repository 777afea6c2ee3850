// Issue 3: checkFlow on a generated 2,000-step flow (goal <= 50 ms) and compileFlow on the same.
// Issue 5: checking a 300-step flow while editing (goal < 100 ms). Medians of 15 runs after warm-up.
import { stringify } from 'yaml';
import { checkFlow } from '../src/lib/flows/check';
import { compileFlow } from '../src/lib/flows/machine';
import { checkFlowText, parseFlow } from '../src/lib/flows/parse';
import { generateFlow as generate } from './generate-flow';
// @ts-expect-error plain JS helper shared by the benchmarks
import { median } from './lib.mjs';

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
