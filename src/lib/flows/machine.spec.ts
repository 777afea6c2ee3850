import { readFileSync } from 'node:fs';
import { createActor } from 'xstate';
import { describe, expect, it } from 'vitest';
import { applyEvent, compileFlow, currentStep, rangeFor, refusal, replay, resolveOutcome } from './machine';
import { parseFlow } from './parse';
import type { ChoiceStep, FlowDefinition, MeasureStep } from './schema';

function fixture(): FlowDefinition {
	const text = readFileSync(
		new URL('../../../tests/fixtures/flows/valid.flow.yaml', import.meta.url),
		'utf8'
	);
	const result = parseFlow(text);
	if (!result.ok) throw new Error('fixture must parse');
	return result.definition;
}

const def = fixture();
const start = () => createActor(compileFlow(def)).start();
const resistance = def.steps['speaker-resistance'] as MeasureStep;

describe('compileFlow', () => {
	it('starts at the start step with an empty path', () => {
		const snap = start().getSnapshot();
		expect(snap.value).toBe('symptom');
		expect(snap.context).toEqual({ flowId: 'valid', path: [] });
		expect(currentStep(snap, def)?.step.title).toBe('What does the customer hear on a call?');
	});

	it('takes an answer by index or by exact label and records it', () => {
		const actor = start();
		actor.send({ type: 'ANSWER', outcome: 1, at: '2026-01-05T10:00:00Z' });
		actor.send({ type: 'ANSWER', outcome: 'Clean' });
		const snap = actor.getSnapshot();
		expect(snap.value).toBe('speaker-resistance');
		expect(snap.context.path).toEqual([
			{
				step: 'symptom',
				kind: 'symptom',
				answer: { index: 1, label: 'Crackling' },
				next: 'open-and-look',
				at: '2026-01-05T10:00:00Z'
			},
			{
				step: 'open-and-look',
				kind: 'test',
				answer: { index: 1, label: 'Clean' },
				next: 'speaker-resistance'
			}
		]);
	});

	it('ignores unknown answers and events meant for another kind of step', () => {
		const actor = start();
		const before = actor.getSnapshot();
		for (const outcome of [2, -1, 0.5, 'crackling', 'Nothing']) actor.send({ type: 'ANSWER', outcome });
		actor.send({ type: 'MEASURE', value: 1 });
		actor.send({ type: 'BACK' });
		expect(actor.getSnapshot().value).toBe('symptom');
		expect(actor.getSnapshot().context).toBe(before.context);
	});

	it('routes readings by range (min inclusive, max exclusive) and refuses bad ones', () => {
		const walk = (value: number) => {
			const actor = start();
			actor.send({ type: 'ANSWER', outcome: 0 });
			actor.send({ type: 'ANSWER', outcome: 'Clean' });
			actor.send({ type: 'MEASURE', value });
			return actor.getSnapshot();
		};
		// Ranges of the fixture: below 20 Ω, 20–40 Ω, 40 Ω and above; readings start at 0 Ω.
		expect(walk(19.999).value).toBe('replace-speaker');
		expect(walk(20).value).toBe('board-fault');
		expect(walk(39.999).value).toBe('board-fault');
		expect(walk(40).value).toBe('replace-speaker');
		expect(walk(0).value).toBe('replace-speaker');
		for (const bad of [-0.001, NaN, Infinity, -Infinity]) {
			const snap = walk(bad);
			expect(snap.value).toBe('speaker-resistance');
			expect(snap.context.path).toHaveLength(2);
		}
	});

	it('ends in a final state whose output names the verdict and the path', () => {
		const actor = start();
		actor.send({ type: 'ANSWER', outcome: 0 });
		actor.send({ type: 'ANSWER', outcome: 1 });
		actor.send({ type: 'MEASURE', value: 25, at: 't' });
		const snap = actor.getSnapshot();
		expect(snap.status).toBe('done');
		expect(snap.output?.verdict).toBe('board-fault');
		expect(snap.output?.path.at(-1)).toEqual({
			step: 'speaker-resistance',
			kind: 'measure',
			reading: { value: 25, unit: 'Ω', range: 1 },
			next: 'board-fault',
			at: 't'
		});
	});

	it('goes back through a loop one answer at a time', () => {
		const actor = start();
		actor.send({ type: 'ANSWER', outcome: 0 });
		actor.send({ type: 'ANSWER', outcome: 0 });
		const atClean = actor.getSnapshot();
		actor.send({ type: 'ANSWER', outcome: 'Still damp, dry it longer' });
		actor.send({ type: 'ANSWER', outcome: 'Still damp, dry it longer' });
		expect(actor.getSnapshot().value).toBe('clean-connector');
		expect(actor.getSnapshot().context.path).toHaveLength(4);
		actor.send({ type: 'BACK' });
		actor.send({ type: 'BACK' });
		expect(actor.getSnapshot().value).toBe('clean-connector');
		expect(actor.getSnapshot().context).toEqual(atClean.context);
		actor.send({ type: 'BACK' });
		actor.send({ type: 'BACK' });
		actor.send({ type: 'BACK' }); // nothing left to undo
		expect(actor.getSnapshot().value).toBe('symptom');
		expect(actor.getSnapshot().context.path).toEqual([]);
	});

	it('resumes from a persisted snapshot after a JSON round trip', () => {
		const actor = start();
		actor.send({ type: 'ANSWER', outcome: 0 });
		const stored = JSON.parse(JSON.stringify(actor.getPersistedSnapshot()));
		const resumed = createActor(compileFlow(def), { snapshot: stored }).start();
		resumed.send({ type: 'BACK' });
		expect(resumed.getSnapshot().value).toBe('symptom');
		resumed.send({ type: 'ANSWER', outcome: 'Crackling' });
		expect(resumed.getSnapshot().value).toBe('open-and-look');
	});

	it('refuses a definition whose start or a target is missing', () => {
		expect(() => compileFlow({ ...def, start: 'nowhere' })).toThrow(/no start step/);
		const broken = structuredClone(def);
		(broken.steps.symptom as ChoiceStep).outcomes![1].next = 'gone';
		expect(() => compileFlow(broken)).toThrow('step "symptom" leads to unknown step "gone"');
	});
});

describe('helpers', () => {
	it('rangeFor explains why a reading is refused', () => {
		expect(rangeFor(resistance, 'twenty')).toMatchObject({ ok: false, reason: 'not-a-number' });
		expect(rangeFor(resistance, -1)).toMatchObject({ ok: false, reason: 'below-domain' });
		expect(rangeFor({ ...resistance, domain: { max: 100 } }, 101)).toMatchObject({
			ok: false,
			reason: 'above-domain'
		});
		expect(rangeFor({ ...resistance, ranges: [] }, 1)).toMatchObject({ ok: false, reason: 'no-range' });
		expect(rangeFor(resistance, 20)).toMatchObject({ ok: true, index: 1 });
	});

	it('resolveOutcome matches whole indices and exact labels only', () => {
		const step = def.steps.symptom as ChoiceStep;
		expect([0, 1, 2, 1.5, '1', 'Crackling', ' Crackling', null].map((o) => resolveOutcome(step, o))).toEqual([
			0, 1, -1, -1, -1, 1, -1, -1
		]);
	});

	it('currentStep is undefined after the flow has no such state', () => {
		expect(currentStep({ value: 'gone' }, def)).toBeUndefined();
	});
});

describe('pure helpers for the server', () => {
	const machine = compileFlow(def);

	it('replays events and stops at the first refused one', () => {
		const ok = replay(machine, [
			{ type: 'ANSWER', outcome: 0 },
			{ type: 'ANSWER', outcome: 'Clean' },
			{ type: 'MEASURE', value: 10 }
		]);
		expect(ok.refusedAt).toBeNull();
		expect(ok.snapshot.status).toBe('done');
		expect(ok.snapshot.output?.verdict).toBe('replace-speaker');

		const bad = replay(machine, [
			{ type: 'ANSWER', outcome: 0 },
			{ type: 'MEASURE', value: 10 },
			{ type: 'ANSWER', outcome: 0 }
		]);
		expect(bad.refusedAt).toBe(1);
		expect(bad.snapshot.value).toBe('open-and-look');
	});

	it('applyEvent refuses after the verdict and agrees with an actor', () => {
		const done = replay(machine, [
			{ type: 'ANSWER', outcome: 0 },
			{ type: 'ANSWER', outcome: 0 },
			{ type: 'ANSWER', outcome: 'Sound is back' }
		]).snapshot;
		expect(done.value).toBe('cleaned');
		expect(applyEvent(machine, done, { type: 'BACK' }).accepted).toBe(false);

		const actor = start();
		actor.send({ type: 'ANSWER', outcome: 1 });
		const pure = applyEvent(machine, replay(machine, []).snapshot, { type: 'ANSWER', outcome: 1 });
		expect(pure.accepted).toBe(true);
		expect(pure.snapshot.value).toBe(actor.getSnapshot().value);
		expect(pure.snapshot.context).toEqual(actor.getSnapshot().context);
	});

	it('refusal explains in words why a step refuses an event', () => {
		expect(refusal(def, 'speaker-resistance', { type: 'MEASURE', value: -2 })).toBe(
			'A reading below 0 Ω is not possible here.'
		);
		expect(refusal(def, 'speaker-resistance', { type: 'MEASURE', value: 2 })).toBeNull();
		expect(refusal(def, 'speaker-resistance', { type: 'ANSWER', outcome: 0 })).toMatch(/takes a reading/);
		expect(refusal(def, 'symptom', { type: 'ANSWER', outcome: 'Silence' })).toMatch(/not one of the choices/);
		expect(refusal(def, 'cleaned', { type: 'BACK' })).toMatch(/verdict/);
	});
});
