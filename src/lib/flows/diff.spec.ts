import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { deepEqual, diffVersions, formatValue } from './diff';
import { addStep, changeKind, deleteStep, moveStep, renameStep, setExit, setStepField } from './edit';
import { parseFlow } from './parse';
import type { FlowDefinition } from './schema';

function shipped(name: string): FlowDefinition {
	const parsed = parseFlow(
		readFileSync(new URL(`../../../flows/${name}.flow.yaml`, import.meta.url), 'utf8')
	);
	if (!parsed.ok) throw new Error(`${name} must parse`);
	return parsed.definition;
}

function must(r: { ok: true; definition: FlowDefinition } | { ok: false; message: string }) {
	if (!r.ok) throw new Error(r.message);
	return r.definition;
}

describe('diffVersions', () => {
	const base = shipped('no-power-after-liquid');

	it('finds nothing between a version and itself, or a copy with keys in another order', () => {
		const d = diffVersions(base, base);
		expect(d.same).toBe(true);
		expect(d.unchanged).toBe(Object.keys(base.steps).length);
		const reKeyed = Object.fromEntries(Object.entries(structuredClone(base)).reverse()) as FlowDefinition;
		expect(diffVersions(base, reKeyed).same).toBe(true);
	});

	it('reports top-level fields', () => {
		const b = { ...base, title: 'No power', symptoms: ['no-power'] };
		expect(diffVersions(base, b).flow).toEqual([
			{ field: 'title', label: 'Title', before: base.title, after: 'No power' },
			{ field: 'symptoms', label: 'Symptom tags', before: base.symptoms, after: ['no-power'] }
		]);
	});

	it('reports added and removed steps; a rename is a removal plus an addition with the start moved', () => {
		let b = must(addStep(base, 'test'));
		b = must(renameStep(b, base.start, 'first-look'));
		const d = diffVersions(base, b);
		expect(d.added.map((s) => s.id)).toEqual(['first-look', 'new-test']);
		expect(d.removed.map((s) => s.id)).toEqual([base.start]);
		expect(d.flow).toEqual([
			{ field: 'start', label: 'Start step', before: base.start, after: 'first-look' }
		]);
		expect(d.same).toBe(false);
	});

	it('reports field by field: body, cautions, minutes, an answer target, a range bound', () => {
		let b = must(setStepField(base, 'open-and-disconnect', 'minutes', 20));
		b = must(setStepField(b, 'open-and-disconnect', 'cautions', ['battery', 'esd']));
		b = must(setStepField(b, 'power-on-as-received', 'body', 'Shorter.'));
		b = must(setExit(b, 'power-on-as-received', 1, { next: 'standby-current' }));
		b = must(setExit(b, 'standby-current', 0, { max: 0.03 }));
		const d = diffVersions(base, b);
		const byStep = Object.fromEntries(d.changed.map((c) => [c.id, c.changes.map((x) => x.field)]));
		expect(byStep).toEqual({
			'power-on-as-received': ['body', 'outcomes[1].next'],
			'open-and-disconnect': ['cautions', 'minutes'],
			'standby-current': ['ranges[0].max']
		});
		const target = d.changed[0].changes[1];
		expect(target).toEqual({
			field: 'outcomes[1].next',
			label: 'Answer 2 ("Stays dark and gets warm"): next step',
			before: 'warm-open',
			after: 'standby-current'
		});
		expect(d.unchanged).toBe(Object.keys(base.steps).length - 3);
	});

	it('reports a kind change with its verdict fields and the answers it dropped', () => {
		const b = must(changeKind(base, 'open-and-disconnect', 'verdict'));
		const changes = diffVersions(base, b).changed[0].changes.map((c) => c.label);
		expect(changes).toEqual([
			'Kind',
			'Minutes',
			'Verdict code',
			'Severity',
			'Repair checklist',
			'Risks',
			'Answer 1 ("Battery swollen, hissing or leaking") removed',
			'Answer 2 ("Battery looks normal and is disconnected") removed'
		]);
	});

	it('notices a new file order without calling steps changed', () => {
		const b = must(moveStep(base, 'standby-current', -1));
		const d = diffVersions(base, b);
		expect(d).toMatchObject({ reordered: true, changed: [], added: [], removed: [] });
	});

	it('lists a deleted verdict as removed', () => {
		const b = must(deleteStep(base, 'battery-out-of-service', { force: true }));
		expect(diffVersions(base, b).removed.map((r) => r.id)).toEqual(['battery-out-of-service']);
	});
});

describe('deepEqual and formatValue', () => {
	it('ignores key order and undefined keys, not values', () => {
		expect(deepEqual({ a: 1, b: [1, { c: 2 }] }, { b: [1, { c: 2 }], a: 1, d: undefined })).toBe(true);
		expect(deepEqual({ a: [1, 2] }, { a: [2, 1] })).toBe(false);
		expect(deepEqual([], {})).toBe(false);
	});
	it('prints values for one line', () => {
		expect(formatValue(['battery', 'esd'])).toBe('battery, esd');
		expect(formatValue({ label: 'Low', max: 0.5, next: 'x' })).toBe('label: Low, max: 0.5, next: x');
		expect(formatValue(undefined)).toBe('(none)');
		expect(formatValue('')).toBe('(empty)');
	});
});

describe('provenance in a diff', () => {
	it('reports a step whose provenance changed, with the entries told apart', () => {
		const base = shipped('no-power-after-liquid');
		const id = Object.keys(base.steps).find((k) => base.steps[k].kind === 'measure')!;
		const entries = [
			{ about: '0.02 A standby limit', basis: 'common-practice' as const },
			{ about: 'bake at 125 °C', basis: 'published' as const, source: 'IPC/JEDEC J-STD-033' }
		];
		const b = must(setStepField(base, id, 'provenance', entries));
		const [step] = diffVersions(base, b).changed;
		expect(step.id).toBe(id);
		expect(step.changes).toEqual([
			{
				field: 'provenance',
				label: 'Where the numbers come from',
				...(base.steps[id].provenance && { before: base.steps[id].provenance }),
				after: entries
			}
		]);
		expect(formatValue(entries)).toBe(
			'about: 0.02 A standby limit, basis: common-practice; about: bake at 125 °C, basis: published, source: IPC/JEDEC J-STD-033'
		);
		expect(formatValue(['battery', 'esd'])).toBe('battery, esd');
	});
});
