import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { checkFlow } from './check';
import {
	addExit,
	addStep,
	changeKind,
	deleteStep,
	describeReference,
	duplicateStep,
	moveExit,
	moveStep,
	newFlow,
	referencesTo,
	removeExit,
	renameStep,
	setExit,
	setStepField,
	type EditResult
} from './edit';
import { tinyFlow } from './fixture';
import { parseFlow } from './parse';

const small = tinyFlow;

/** Freezes deeply so that any mutation of the input throws in strict mode. */
function frozen<T>(value: T): T {
	if (value && typeof value === 'object') {
		for (const v of Object.values(value)) frozen(v);
		Object.freeze(value);
	}
	return value;
}

function ok(r: EditResult) {
	if (!r.ok) throw new Error(`expected success, got: ${r.message}`);
	return r;
}

describe('renameStep', () => {
	it('moves every reference — start, answers and ranges — and keeps the step in place', () => {
		const def = frozen(small());
		const renamed = ok(renameStep(def, 'fine', 'no-fault')).definition;
		expect(Object.keys(renamed.steps)).toEqual(['look', 'draw', 'no-fault', 'short']);
		expect(renamed.steps.look.kind === 'symptom' && renamed.steps.look.outcomes?.[0].next).toBe('no-fault');
		expect(renamed.steps.draw.kind === 'measure' && renamed.steps.draw.ranges?.[0].next).toBe('no-fault');
		expect(checkFlow(renamed).problems).toEqual([]);
		const startMoved = ok(renameStep(def, 'look', 'first-look')).definition;
		expect(startMoved.start).toBe('first-look');
		expect(checkFlow(startMoved).ok).toBe(true);
	});

	it('follows every reference in a shipped flow, which still passes the check', () => {
		const text = readFileSync(
			new URL('../../../flows/no-power-after-liquid.flow.yaml', import.meta.url),
			'utf8'
		);
		const parsed = parseFlow(text);
		if (!parsed.ok) throw new Error('shipped flow must parse');
		const def = frozen(parsed.definition);
		const before = referencesTo(def, 'standby-current').length;
		expect(before).toBeGreaterThan(0);
		const renamed = ok(renameStep(def, 'standby-current', 'idle-draw')).definition;
		expect(referencesTo(renamed, 'idle-draw')).toHaveLength(before);
		expect(referencesTo(renamed, 'standby-current')).toEqual([]);
		expect(checkFlow(renamed).ok).toBe(true);
	});

	it('refuses a clash, a bad id and a missing step, leaving the flow as it was', () => {
		const def = frozen(small());
		const clash = renameStep(def, 'fine', 'short');
		expect(clash).toMatchObject({ ok: false, message: expect.stringContaining('already a step "short"') });
		const bad = renameStep(def, 'fine', 'Not Kebab');
		expect(bad).toMatchObject({ ok: false, message: expect.stringContaining('kebab-case') });
		expect(renameStep(def, 'nope', 'x')).toMatchObject({ ok: false });
		expect(renameStep(def, 'fine', 'fine')).toMatchObject({ ok: true, definition: def });
	});
});

describe('deleteStep', () => {
	it('refuses while referenced and names the references', () => {
		const def = frozen(small());
		const r = deleteStep(def, 'fine');
		expect(r.ok).toBe(false);
		if (r.ok) return;
		expect(r.references).toEqual([
			{ from: 'outcome', step: 'look', index: 0, label: 'Dry' },
			{ from: 'range', step: 'draw', index: 0, label: 'Low' }
		]);
		expect(r.message).toContain('answer "Dry" of step "look"');
		expect(r.message).toContain('range 1 ("Low") of step "draw"');
		expect(describeReference({ from: 'start' })).toBe('the flow starts here');
	});

	it('deletes when forced, leaving the dangling references for the check to show', () => {
		const def = frozen(small());
		const r = ok(deleteStep(def, 'fine', { force: true }));
		expect(Object.keys(r.definition.steps)).toEqual(['look', 'draw', 'short']);
		expect(r.id).toBe('short');
		const codes = checkFlow(r.definition).problems.map((p) => [p.code, p.step]);
		expect(codes).toEqual(
			expect.arrayContaining([
				['unknown-target', 'look'],
				['unknown-target', 'draw']
			])
		);
	});

	it('deletes an unreferenced step outright; a self-loop does not count as a reference', () => {
		let def = small();
		def = ok(addStep(def, 'test')).definition;
		def = ok(setExit(def, 'new-test', 0, { next: 'new-test' })).definition;
		const r = ok(deleteStep(frozen(def), 'new-test'));
		expect(Object.keys(r.definition.steps)).toEqual(Object.keys(small().steps));
	});
});

describe('addStep, duplicateStep, moveStep', () => {
	it('adds a step with a free id after the given step', () => {
		const def = frozen(small());
		const a = ok(addStep(def, 'test', 'look'));
		expect(a.id).toBe('new-test');
		expect(Object.keys(a.definition.steps)).toEqual(['look', 'new-test', 'draw', 'fine', 'short']);
		const b = ok(addStep(a.definition, 'test'));
		expect(b.id).toBe('new-test-2');
		expect(Object.keys(b.definition.steps).at(-1)).toBe('new-test-2');
	});

	it('duplicates a verdict with a fresh id and a fresh verdict code', () => {
		const def = frozen(small());
		const d = ok(duplicateStep(def, 'short'));
		expect(d.id).toBe('short-copy');
		const copy = d.definition.steps['short-copy'];
		expect(copy.kind === 'verdict' && copy.verdict.code).toBe('short-copy');
		// The copy is unreachable (nothing leads to it) but not a duplicate code.
		const codes = checkFlow(d.definition).problems.map((p) => p.code);
		expect(codes).toEqual(['unreachable-step']);
		expect(ok(duplicateStep(d.definition, 'short')).id).toBe('short-copy-2');
	});

	it('moves a step in the file order only', () => {
		const def = frozen(small());
		expect(Object.keys(ok(moveStep(def, 'draw', -1)).definition.steps)).toEqual([
			'draw',
			'look',
			'fine',
			'short'
		]);
		expect(ok(moveStep(def, 'look', -1)).definition).toBe(def);
	});
});

describe('fields, exits and kinds', () => {
	it('sets and removes fields without touching other steps', () => {
		const def = frozen(small());
		const r = ok(setStepField(def, 'look', 'body', 'Hold **power**.')).definition;
		expect(r.steps.look.body).toBe('Hold **power**.');
		expect(r.steps.draw).toBe(def.steps.draw);
		expect('body' in ok(setStepField(r, 'look', 'body', undefined)).definition.steps.look).toBe(false);
		expect(setStepField(def, 'look', 'kind', 'test').ok).toBe(false);
	});

	it('adds, edits, reorders and removes answers and ranges', () => {
		const def = frozen(small());
		let r = ok(addExit(def, 'look')).definition;
		r = ok(setExit(r, 'look', 2, { label: 'Sticky', next: 'short' })).definition;
		r = ok(moveExit(r, 'look', 2, -1)).definition;
		const look = r.steps.look;
		expect(look.kind === 'symptom' && look.outcomes?.map((o) => o.label)).toEqual(['Dry', 'Sticky', 'Wet']);
		r = ok(removeExit(r, 'look', 1)).definition;
		expect(checkFlow(r).ok).toBe(true);
		const open = ok(setExit(def, 'draw', 1, { min: undefined })).definition.steps.draw;
		expect(open.kind === 'measure' && 'min' in open.ranges![1]).toBe(false);
		expect(addExit(def, 'fine')).toMatchObject({ ok: false, message: expect.stringContaining('verdict') });
		expect(removeExit(def, 'look', 5).ok).toBe(false);
	});

	it('changes kind keeping what fits', () => {
		const def = frozen(small());
		const asTest = ok(changeKind(def, 'look', 'test')).definition.steps.look;
		expect(asTest.kind === 'test' && asTest.outcomes?.length).toBe(2);
		const asMeasure = ok(changeKind(def, 'look', 'measure')).definition.steps.look;
		expect(asMeasure.kind === 'measure' && asMeasure.ranges?.map((r) => r.next)).toEqual(['fine', 'draw']);
		const asChoice = ok(changeKind(def, 'draw', 'test')).definition.steps.draw;
		expect(asChoice.kind === 'test' && asChoice.outcomes?.map((o) => o.label)).toEqual(['Low', 'High']);
		const v = changeKind(def, 'draw', 'verdict');
		expect(v).toMatchObject({ ok: true, dropped: 2 });
		const verdict = ok(v).definition.steps.draw;
		expect(verdict.kind === 'verdict' && verdict.verdict.code).toBe('draw');
	});

	it('starts a new flow whose only problem is the answer still to be pointed somewhere', () => {
		const problems = checkFlow(newFlow('wet-speaker', 'Wet speaker')).problems.map((p) => p.code);
		expect(problems).toEqual(['unknown-target']);
	});
});
