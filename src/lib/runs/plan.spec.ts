import { describe, expect, it } from 'vitest';
import { createActor } from 'xstate';
import { compileFlow } from '$lib/flows/machine';
import { tinyFlow } from '$lib/flows/fixture';
import { dataReachableOf, planEvent, type StoredSnapshot } from './plan';

// The tiny fixture flow: look → (Dry → fine | Wet → draw → (< 0.5 A fine | ≥ 0.5 A short)).
const definition = tinyFlow();
const machine = compileFlow(definition);
const start = (): StoredSnapshot => {
	const actor = createActor(machine).start();
	const snapshot = actor.getPersistedSnapshot() as StoredSnapshot;
	actor.stop();
	return snapshot;
};
const accepted = (r: ReturnType<typeof planEvent>) => {
	if (!r.ok) throw new Error(`refused: ${r.message}`);
	return r.plan;
};

describe('planEvent', () => {
	it('plans an answer: the target step, the stored answer and a live snapshot to go on from', () => {
		const wet = accepted(
			planEvent(definition, machine, start(), { type: 'ANSWER', outcome: 'Wet' }, { at: 'T1' })
		);
		expect(wet).toMatchObject({
			currentStep: 'draw',
			done: false,
			verdictCode: null,
			kind: 'symptom',
			answer: { outcome: { index: 1, label: 'Wet' } }
		});
		expect(wet.path).toEqual([
			{ step: 'look', kind: 'symptom', answer: { index: 1, label: 'Wet' }, next: 'draw', at: 'T1' }
		]);
		const high = accepted(planEvent(definition, machine, wet.snapshot, { type: 'MEASURE', value: 0.8 }));
		expect(high).toMatchObject({
			currentStep: 'short',
			done: true,
			verdictCode: 'short',
			kind: 'measure',
			answer: { value: 0.8, unit: 'A', range: { index: 1, label: 'High' } }
		});
	});

	it('plans a BACK with the step number it revises, and refuses one on the first step', () => {
		const wet = accepted(planEvent(definition, machine, start(), { type: 'ANSWER', outcome: 1 }));
		const back = accepted(planEvent(definition, machine, wet.snapshot, { type: 'BACK' }, { revises: 7 }));
		expect(back).toMatchObject({
			currentStep: 'look',
			kind: 'back',
			answer: { back: { revised: 7 } },
			path: []
		});
		expect(planEvent(definition, machine, start(), { type: 'BACK' })).toEqual({
			ok: false,
			message: 'This is the first step: there is nothing to go back to.'
		});
	});

	it('refuses, in words, an outcome the step does not have and a reading on a choice step', () => {
		const r = planEvent(definition, machine, start(), { type: 'ANSWER', outcome: 5 });
		expect(r).toEqual({
			ok: false,
			message: '“5” is not an outcome of this step. Choose one of: 1 Dry; 2 Wet.'
		});
		expect(planEvent(definition, machine, start(), { type: 'MEASURE', value: 1 })).toEqual({
			ok: false,
			message: '“Look at the phone” is a symptom step; it takes no reading.'
		});
		const wet = accepted(planEvent(definition, machine, start(), { type: 'ANSWER', outcome: 1 }));
		expect(planEvent(definition, machine, wet.snapshot, { type: 'MEASURE', value: -1 }).ok).toBe(false);
	});
});

describe('dataReachableOf', () => {
	it('is true once an answer records data-reachable, false on data-unreachable, null otherwise', () => {
		const entry = (records?: string) => ({
			step: 's',
			kind: 'test' as const,
			answer: { index: 0, label: 'x' },
			next: 'n',
			...(records ? { records } : {})
		});
		expect(dataReachableOf([entry()])).toBeNull();
		expect(dataReachableOf([entry('data-unreachable')])).toBe(false);
		expect(dataReachableOf([entry('data-unreachable'), entry('data-reachable')])).toBe(true);
	});
});
