/**
 * One generated flow for the benchmarks (flows.bench.ts, editor.bench.ts): shaped like an authored
 * one but as large as asked. Questions and measurements in layers, every exit pointing a few steps
 * ahead, one in ten questions with a "dry and test again" loop, one in seven with cautions, and one
 * verdict per twenty steps at the end, each reached from some measurement (round-robin, so every
 * verdict is reachable). Deterministic (fixed LCG seed) so runs compare; passes checkFlow.
 */
import type { FlowDefinition } from '../src/lib/flows/schema';

export function generateFlow(size: number, seed = 12345): FlowDefinition {
	const rnd = (n: number) => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) >>> 8) % n;
	const verdicts = Math.max(3, Math.floor(size / 20));
	const questions = size - verdicts;
	const id = (i: number) => `step-${i}`;
	const ahead = (i: number) => id(Math.min(size - 1, i + 1 + rnd(8)));
	const steps: FlowDefinition['steps'] = {};
	let nextVerdict = 0;
	for (let i = 0; i < questions; i++) {
		const next = i + 1 < questions ? id(i + 1) : id(questions);
		if (i % 4 === 3) {
			steps[id(i)] = {
				kind: 'measure',
				title: `Reading ${i}`,
				minutes: 2,
				unit: 'A',
				provenance: [{ about: 'the 0.01 A and 0.5 A lines', basis: 'common-practice' }],
				domain: { min: 0 },
				ranges: [
					{ max: 0.01, next, label: 'No draw' },
					{ min: 0.01, max: 0.5, next: ahead(i), label: 'Normal' },
					{ min: 0.5, next: id(questions + (nextVerdict++ % verdicts)), label: 'High' }
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
			...(i % 7 === 0 && { cautions: ['battery', 'esd'] }),
			outcomes
		};
	}
	for (let v = questions; v < size; v++)
		steps[id(v)] = {
			kind: 'verdict',
			title: `Verdict ${v}`,
			verdict: {
				code: `verdict-${v}`,
				severity: 'repair',
				repair: '- [ ] Repair.\n- [ ] New adhesive and seals.',
				risks: 'Risks. Water resistance is no longer assured.'
			}
		};
	return { id: 'generated', title: 'Generated', summary: '', symptoms: [], start: id(0), steps };
}
