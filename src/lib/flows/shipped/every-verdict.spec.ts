import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkFlowText } from '../parse';
import { compileFlow, currentStep, replay, type FlowEvent } from '../machine';
import type { FlowDefinition, Range } from '../schema';

// Every shipped flow, walked from its start to each of its verdicts along the fewest steps, through
// the compiled machine exactly as the server replays a run: a verdict no walk reaches, or a walk
// the machine refuses, fails here. New flows in flows/ are covered without a line of test code.
const dir = path.resolve('flows');
const files = fs.readdirSync(dir).filter((f) => f.endsWith('.flow.yaml'));

/** A reading inside a half-open range [min, max), inside the step's domain. */
function readingIn(range: Range, domain: { min?: number; max?: number } = {}) {
	const lo = range.min ?? domain.min;
	const hi = range.max ?? domain.max;
	if (lo !== undefined && hi !== undefined) return (lo + hi) / 2;
	if (lo !== undefined) return lo + 1;
	if (hi !== undefined) return hi - 1;
	return 0;
}

/** Breadth-first: for each step, the events of the fewest-steps walk from start to it. */
function walks(def: FlowDefinition): Map<string, FlowEvent[]> {
	const found = new Map<string, FlowEvent[]>([[def.start, []]]);
	const queue = [def.start];
	while (queue.length) {
		const id = queue.shift()!;
		const step = def.steps[id];
		const exits: { next: string; event: FlowEvent }[] =
			step.kind === 'symptom' || step.kind === 'test'
				? (step.outcomes ?? []).map((o, i) => ({ next: o.next, event: { type: 'ANSWER', outcome: i } }))
				: step.kind === 'measure'
					? (step.ranges ?? []).map((r) => ({
							next: r.next,
							event: { type: 'MEASURE', value: readingIn(r, step.domain) }
						}))
					: [];
		for (const { next, event } of exits) {
			if (found.has(next)) continue;
			found.set(next, [...found.get(id)!, event]);
			queue.push(next);
		}
	}
	return found;
}

describe.each(files)('%s', (file) => {
	const result = checkFlowText(fs.readFileSync(path.join(dir, file), 'utf8'), {
		fileStem: file.replace(/\.flow\.yaml$/, '')
	});

	it('passes the checker', () => {
		expect(result.problems).toEqual([]);
	});

	it('reaches every verdict through the compiled machine', () => {
		const def = result.definition!;
		const machine = compileFlow(def);
		const paths = walks(def);
		const verdicts = Object.entries(def.steps).filter(([, s]) => s.kind === 'verdict');
		expect(verdicts.length).toBeGreaterThan(0);
		for (const [id, step] of verdicts) {
			const events = paths.get(id);
			expect(events, `no walk reaches ${id}`).toBeDefined();
			const { snapshot, refusedAt } = replay(machine, events!);
			expect(refusedAt, `${id}: the machine refused event ${refusedAt}`).toBeNull();
			expect(currentStep(snapshot, def)?.id, id).toBe(id);
			expect(snapshot.status).toBe('done');
			if (step.kind === 'verdict') expect(snapshot.output?.verdict).toBe(step.verdict.code);
		}
	});
});
