/**
 * diffVersions: what changed between two versions of a flow, step by step and field by field,
 * in words a reviewer reads. Steps are matched by id (a renamed step shows as removed + added).
 */
import type { FlowDefinition, Step, StepKind } from './schema';

export interface FieldChange {
	/** Path of the field, e.g. `outcomes[1].next`, `verdict.severity`. */
	field: string;
	/** The same in words, e.g. `Answer 2 ("Wet") → next step`. */
	label: string;
	/** Absent when the field was added. */
	before?: unknown;
	/** Absent when the field was removed. */
	after?: unknown;
}

export interface StepChange {
	id: string;
	kind: StepKind;
	title: string;
	changes: FieldChange[];
}

export interface FlowDiff {
	/** Top-level fields: title, summary, symptoms, start. */
	flow: FieldChange[];
	added: { id: string; step: Step }[];
	removed: { id: string; step: Step }[];
	changed: StepChange[];
	unchanged: number;
	/** Same steps in a different file order (the graph is unaffected). */
	reordered: boolean;
	same: boolean;
}

export function deepEqual(a: unknown, b: unknown): boolean {
	if (Object.is(a, b)) return true;
	if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
	if (Array.isArray(a) !== Array.isArray(b)) return false;
	const ka = Object.keys(a).filter((k) => (a as Record<string, unknown>)[k] !== undefined);
	const kb = Object.keys(b).filter((k) => (b as Record<string, unknown>)[k] !== undefined);
	if (ka.length !== kb.length) return false;
	return ka.every((k) => deepEqual((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
}

const FLOW_FIELDS: [keyof FlowDefinition, string][] = [
	['title', 'Title'],
	['summary', 'Summary'],
	['symptoms', 'Symptom tags'],
	['start', 'Start step']
];

const STEP_FIELDS: [string, string][] = [
	['kind', 'Kind'],
	['title', 'Title'],
	['body', 'Instructions'],
	['cautions', 'Cautions'],
	['provenance', 'Where the numbers come from'],
	['minutes', 'Minutes'],
	['unit', 'Unit'],
	['instrument', 'Instrument'],
	['domain.min', 'Lowest valid reading'],
	['domain.max', 'Highest valid reading'],
	['verdict.code', 'Verdict code'],
	['verdict.severity', 'Severity'],
	['verdict.repair', 'Repair checklist'],
	['verdict.parts', 'Parts'],
	['verdict.risks', 'Risks']
];

const EXIT_FIELDS: [string, string][] = [
	['label', 'label'],
	['min', 'from'],
	['max', 'below'],
	['records', 'records'],
	['next', 'next step']
];

function at(obj: unknown, path: string): unknown {
	let v = obj;
	for (const k of path.split('.'))
		v = v && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined;
	return v;
}

function change(field: string, label: string, before: unknown, after: unknown): FieldChange | null {
	if (deepEqual(before, after)) return null;
	return {
		field,
		label,
		...(before !== undefined && { before }),
		...(after !== undefined && { after })
	};
}

function exitsList(step: Step): { key: 'outcomes' | 'ranges'; list: Record<string, unknown>[] } {
	if (step.kind === 'measure') return { key: 'ranges', list: step.ranges ?? [] };
	return { key: 'outcomes', list: (step.outcomes ?? []) as Record<string, unknown>[] };
}

function exitName(key: 'outcomes' | 'ranges', i: number, item: Record<string, unknown> | undefined) {
	const noun = key === 'ranges' ? 'Range' : 'Answer';
	const label = typeof item?.label === 'string' ? ` ("${item.label}")` : '';
	return `${noun} ${i + 1}${label}`;
}

/** Answers and ranges compared position by position. */
function exitChanges(a: Step, b: Step): FieldChange[] {
	const ea = exitsList(a);
	const eb = exitsList(b);
	const out: FieldChange[] = [];
	const n = Math.max(ea.list.length, eb.list.length);
	for (let i = 0; i < n; i++) {
		const x = ea.key === eb.key ? ea.list[i] : undefined;
		const y = eb.list[i];
		const key = y ? eb.key : ea.key;
		const name = exitName(key, i, y ?? x);
		if (!x || !y) {
			const c = change(`${key}[${i}]`, `${name} ${x ? 'removed' : 'added'}`, x, y);
			if (c) out.push(c);
			continue;
		}
		for (const [f, words] of EXIT_FIELDS) {
			const c = change(`${key}[${i}].${f}`, `${name}: ${words}`, x[f], y[f]);
			if (c) out.push(c);
		}
	}
	// Exits that only the old kind had (e.g. a measure turned into a test).
	if (ea.key !== eb.key)
		ea.list.forEach((x, i) => {
			out.push({ field: `${ea.key}[${i}]`, label: `${exitName(ea.key, i, x)} removed`, before: x });
		});
	return out;
}

export function stepChanges(a: Step, b: Step): FieldChange[] {
	const out: FieldChange[] = [];
	for (const [field, label] of STEP_FIELDS) {
		const c = change(field, label, at(a, field), at(b, field));
		if (c) out.push(c);
	}
	return [...out, ...exitChanges(a, b)];
}

export function diffVersions(a: FlowDefinition, b: FlowDefinition): FlowDiff {
	const flow: FieldChange[] = [];
	for (const [field, label] of FLOW_FIELDS) {
		const c = change(field, label, a[field], b[field]);
		if (c) flow.push(c);
	}
	const has = (def: FlowDefinition, id: string) => Object.hasOwn(def.steps, id);
	const added = Object.keys(b.steps)
		.filter((id) => !has(a, id))
		.map((id) => ({ id, step: b.steps[id] }));
	const removed = Object.keys(a.steps)
		.filter((id) => !has(b, id))
		.map((id) => ({ id, step: a.steps[id] }));
	const changed: StepChange[] = [];
	let unchanged = 0;
	for (const id of Object.keys(b.steps)) {
		if (!has(a, id)) continue;
		const changes = stepChanges(a.steps[id], b.steps[id]);
		if (changes.length) changed.push({ id, kind: b.steps[id].kind, title: b.steps[id].title, changes });
		else unchanged++;
	}
	const common = (def: FlowDefinition, other: FlowDefinition) =>
		Object.keys(def.steps).filter((id) => has(other, id));
	const reordered = !deepEqual(common(a, b), common(b, a));
	const same = !flow.length && !added.length && !removed.length && !changed.length;
	return { flow, added, removed, changed, unchanged, reordered, same };
}

/** A field value in a line of text: lists joined, objects as compact `key: value`, text quoted. */
export function formatValue(value: unknown): string {
	if (value === undefined) return '(none)';
	// Entries that are themselves key: value lists (provenance) are told apart with semicolons.
	if (Array.isArray(value))
		return value.length
			? value.map(formatValue).join(value.some((v) => v && typeof v === 'object') ? '; ' : ', ')
			: '(empty list)';
	if (value && typeof value === 'object')
		return Object.entries(value)
			.filter(([, v]) => v !== undefined)
			.map(([k, v]) => `${k}: ${formatValue(v)}`)
			.join(', ');
	if (typeof value === 'string') return value === '' ? '(empty)' : value;
	return String(value);
}
