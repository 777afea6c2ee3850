// Over 300 lines on purpose: one pure operation per editor action, each with its refusal message.
/**
 * Editing operations on a flow definition for the editor. Pure and immutable: every operation
 * returns a new definition (sharing untouched steps) or a refusal with a message for the author.
 * Operations keep what the author wrote even when it does not pass the check yet (an empty title,
 * a `next` naming no step): the live check reports those, the editor must never lose them.
 */
import { kebabId, type FlowDefinition, type Outcome, type Range, type Step, type StepKind } from './schema';

export type EditResult =
	| { ok: true; definition: FlowDefinition; /** The step the editor should select next. */ id?: string }
	| { ok: false; message: string; references?: Reference[] };

/** One place that leads to a step: the flow's start, or an answer or range of another step. */
export interface Reference {
	from: 'start' | 'outcome' | 'range';
	/** The step holding the exit; absent for the start. */
	step?: string;
	index?: number;
	/** The answer's label or the range's label, when it has one. */
	label?: string;
}

const refuse = (message: string, references?: Reference[]): EditResult => ({
	ok: false,
	message,
	...(references && { references })
});

const hasStep = (def: FlowDefinition, id: string) => Object.hasOwn(def.steps, id);

/** A step id nobody uses yet: `base`, else `base-2`, `base-3`, … */
export function freeId(def: FlowDefinition, base: string): string {
	if (!hasStep(def, base)) return base;
	for (let n = 2; ; n++) if (!hasStep(def, `${base}-${n}`)) return `${base}-${n}`;
}

function verdictCodes(def: FlowDefinition): Set<string> {
	const codes = new Set<string>();
	for (const s of Object.values(def.steps)) if (s.kind === 'verdict') codes.add(s.verdict.code);
	return codes;
}

function freeCode(def: FlowDefinition, base: string): string {
	const used = verdictCodes(def);
	if (!used.has(base)) return base;
	for (let n = 2; ; n++) if (!used.has(`${base}-${n}`)) return `${base}-${n}`;
}

/** Steps in order with `entry` placed right after `after` (or at the end). */
function insertAfter(
	steps: FlowDefinition['steps'],
	after: string | undefined,
	entry: [string, Step]
): FlowDefinition['steps'] {
	const out: FlowDefinition['steps'] = {};
	let placed = false;
	for (const [id, step] of Object.entries(steps)) {
		out[id] = step;
		if (id === after) {
			out[entry[0]] = entry[1];
			placed = true;
		}
	}
	if (!placed) out[entry[0]] = entry[1];
	return out;
}

/** A fresh step of a kind, with the fields the form shows filled with placeholders to overwrite. */
export function blankStep(kind: StepKind, code = 'new-verdict'): Step {
	switch (kind) {
		case 'symptom':
			return { kind, title: 'New symptom', minutes: 1, outcomes: [{ label: 'Yes', next: '' }] };
		case 'test':
			return { kind, title: 'New test', minutes: 5, outcomes: [{ label: 'Yes', next: '' }] };
		case 'measure':
			return { kind, title: 'New measurement', minutes: 5, unit: 'V', ranges: [{ next: '' }] };
		case 'verdict':
			return {
				kind,
				title: 'New verdict',
				verdict: { code, severity: 'repair', repair: '- [ ] ', risks: '' }
			};
	}
}

export function addStep(def: FlowDefinition, kind: StepKind, after?: string): EditResult {
	const id = freeId(def, `new-${kind}`);
	const step = blankStep(kind, freeCode(def, id));
	return { ok: true, id, definition: { ...def, steps: insertAfter(def.steps, after, [id, step]) } };
}

export function duplicateStep(def: FlowDefinition, id: string): EditResult {
	const step = def.steps[id];
	if (!step || !hasStep(def, id)) return refuse(`There is no step "${id}" to duplicate.`);
	const copyId = freeId(def, `${id}-copy`);
	const copy: Step = structuredClone(step);
	// Verdict codes must stay unique, so the copy gets its own.
	if (copy.kind === 'verdict') copy.verdict.code = freeCode(def, `${copy.verdict.code}-copy`);
	return { ok: true, id: copyId, definition: { ...def, steps: insertAfter(def.steps, id, [copyId, copy]) } };
}

/** Every place that leads to `id`, in step order. */
export function referencesTo(def: FlowDefinition, id: string): Reference[] {
	const refs: Reference[] = [];
	if (def.start === id) refs.push({ from: 'start' });
	for (const [from, step] of Object.entries(def.steps)) {
		if (step.kind === 'symptom' || step.kind === 'test')
			(step.outcomes ?? []).forEach((o, index) => {
				if (o.next === id) refs.push({ from: 'outcome', step: from, index, label: o.label });
			});
		else if (step.kind === 'measure')
			(step.ranges ?? []).forEach((r, index) => {
				if (r.next === id)
					refs.push({ from: 'range', step: from, index, ...(r.label && { label: r.label }) });
			});
	}
	return refs;
}

/** "start", "answer "Yes" of step a", "range 2 of step b" */
export function describeReference(ref: Reference): string {
	if (ref.from === 'start') return 'the flow starts here';
	if (ref.from === 'outcome') return `answer "${ref.label}" of step "${ref.step}"`;
	const label = ref.label ? ` ("${ref.label}")` : '';
	return `range ${(ref.index ?? 0) + 1}${label} of step "${ref.step}"`;
}

/** Points every exit and the start that name `from` at `to`. */
function retarget(def: FlowDefinition, from: string, to: string): FlowDefinition {
	const follow = <T extends { next: string }>(list: T[] | undefined) =>
		list?.some((c) => c.next === from) ? list.map((c) => (c.next === from ? { ...c, next: to } : c)) : list;
	const steps: FlowDefinition['steps'] = {};
	for (const [id, step] of Object.entries(def.steps)) {
		if (step.kind === 'symptom' || step.kind === 'test') {
			const outcomes = follow(step.outcomes);
			steps[id] = outcomes === step.outcomes ? step : { ...step, outcomes };
		} else if (step.kind === 'measure') {
			const ranges = follow(step.ranges);
			steps[id] = ranges === step.ranges ? step : { ...step, ranges };
		} else steps[id] = step;
	}
	return { ...def, start: def.start === from ? to : def.start, steps };
}

export function renameStep(def: FlowDefinition, from: string, to: string): EditResult {
	if (!hasStep(def, from)) return refuse(`There is no step "${from}" to rename.`);
	const id = to.trim();
	if (id === from) return { ok: true, id, definition: def };
	const valid = kebabId.safeParse(id);
	if (!valid.success) return refuse(`"${id}" cannot be a step id: it ${valid.error.issues[0].message}.`);
	if (hasStep(def, id))
		return refuse(`There is already a step "${id}". Choose another id or delete that step first.`);
	const moved = retarget(def, from, id);
	// Rebuild in order so the renamed step keeps its place in the file.
	const steps: FlowDefinition['steps'] = {};
	for (const [key, step] of Object.entries(moved.steps)) steps[key === from ? id : key] = step;
	return { ok: true, id, definition: { ...moved, steps } };
}

/**
 * Deletes a step. While anything leads to it the deletion is refused with those references, so
 * the editor can show them; `force` deletes anyway and leaves them dangling for the check to show.
 */
export function deleteStep(def: FlowDefinition, id: string, options: { force?: boolean } = {}): EditResult {
	if (!hasStep(def, id)) return refuse(`There is no step "${id}" to delete.`);
	const references = referencesTo(def, id).filter((r) => r.step !== id);
	if (references.length && !options.force)
		return refuse(
			`"${id}" is still in use: ${references.map(describeReference).join('; ')}. Point these elsewhere first, or delete anyway and fix them afterwards.`,
			references
		);
	const ids = Object.keys(def.steps);
	const at = ids.indexOf(id);
	const steps = { ...def.steps };
	delete steps[id];
	const neighbour = ids[at + 1] ?? ids[at - 1];
	return { ok: true, definition: { ...def, steps }, ...(neighbour && { id: neighbour }) };
}

/** Moves a step up (-1) or down (+1) in the file order; the graph does not change. */
export function moveStep(def: FlowDefinition, id: string, delta: -1 | 1): EditResult {
	const ids = Object.keys(def.steps);
	const at = ids.indexOf(id);
	if (at < 0) return refuse(`There is no step "${id}" to move.`);
	const to = at + delta;
	if (to < 0 || to >= ids.length) return { ok: true, id, definition: def };
	[ids[at], ids[to]] = [ids[to], ids[at]];
	return {
		ok: true,
		id,
		definition: { ...def, steps: Object.fromEntries(ids.map((k) => [k, def.steps[k]])) }
	};
}

/** Replaces one step with what `change` returns. */
export function updateStep(def: FlowDefinition, id: string, change: (step: Step) => Step): EditResult {
	const step = def.steps[id];
	if (!step || !hasStep(def, id)) return refuse(`There is no step "${id}".`);
	return { ok: true, id, definition: { ...def, steps: { ...def.steps, [id]: change(step) } } };
}

/** Sets (or, with undefined, removes) one plain field of a step. */
export function setStepField(def: FlowDefinition, id: string, key: string, value: unknown): EditResult {
	if (key === 'kind') return refuse('Use changeKind to change what kind of step this is.');
	return updateStep(def, id, (step) => {
		const next = { ...step } as Record<string, unknown>;
		if (value === undefined) delete next[key];
		else next[key] = value;
		return next as Step;
	});
}

type FlowField = 'id' | 'title' | 'summary' | 'symptoms' | 'start';
export function setFlowField<K extends FlowField>(
	def: FlowDefinition,
	key: K,
	value: FlowDefinition[K]
): FlowDefinition {
	return { ...def, [key]: value };
}

/**
 * Changes a step's kind, carrying over what still fits: symptom ↔ test keep everything; a choice
 * step becoming a measure keeps its targets as ranges (bounds to fill in) and the reverse keeps
 * them as answers; a verdict has no exits, so they are dropped (and the message says so).
 */
export function changeKind(
	def: FlowDefinition,
	id: string,
	kind: StepKind
): EditResult & { dropped?: number } {
	const step = def.steps[id];
	if (!step || !hasStep(def, id)) return refuse(`There is no step "${id}".`);
	if (step.kind === kind) return { ok: true, id, definition: def };
	const { title, body, cautions } = step;
	const common = { title, ...(body !== undefined && { body }), ...(cautions && { cautions }) };
	const minutes = step.minutes ?? 1;
	let next: Step;
	let dropped = 0;
	if (kind === 'verdict') {
		dropped = exitCount(step);
		next = { kind, ...common, verdict: blankVerdict(def, id) };
	} else if (kind === 'measure') {
		const ranges: Range[] =
			step.kind === 'verdict'
				? [{ next: '' }]
				: step.kind === 'measure'
					? (step.ranges ?? [])
					: (step.outcomes ?? []).map((o) => ({ label: o.label, next: o.next }));
		next = { kind, ...common, minutes, unit: 'V', ranges };
	} else {
		const outcomes: Outcome[] =
			step.kind === 'symptom' || step.kind === 'test'
				? (step.outcomes ?? [])
				: step.kind === 'measure'
					? (step.ranges ?? []).map((r, i) => ({ label: r.label ?? `Range ${i + 1}`, next: r.next }))
					: [{ label: 'Yes', next: '' }];
		next = { kind, ...common, minutes, outcomes };
	}
	return { ok: true, id, dropped, definition: { ...def, steps: { ...def.steps, [id]: next } } };
}

function exitCount(step: Step): number {
	if (step.kind === 'measure') return step.ranges?.length ?? 0;
	return step.outcomes?.length ?? 0;
}

function blankVerdict(def: FlowDefinition, id: string) {
	return { code: freeCode(def, id), severity: 'repair' as const, repair: '- [ ] ', risks: '' };
}

// -- outcomes of a symptom/test and ranges of a measure, by index ---------------------------

type ExitList = 'outcomes' | 'ranges';
const listOf = (step: Step): ExitList | null =>
	step.kind === 'measure' ? 'ranges' : step.kind === 'verdict' ? null : 'outcomes';

function editExits(
	def: FlowDefinition,
	id: string,
	change: (list: (Outcome | Range)[]) => (Outcome | Range)[] | string
): EditResult {
	const step = def.steps[id];
	if (!step || !hasStep(def, id)) return refuse(`There is no step "${id}".`);
	const key = listOf(step);
	if (!key) return refuse('A verdict ends the flow; it has no answers or ranges.');
	const list = ((step as Record<string, unknown>)[key] as (Outcome | Range)[] | undefined) ?? [];
	const result = change(list);
	if (typeof result === 'string') return refuse(result);
	return {
		ok: true,
		id,
		definition: { ...def, steps: { ...def.steps, [id]: { ...step, [key]: result } as Step } }
	};
}

/** Adds an answer (or a range to a measure) that leads nowhere yet. */
export const addExit = (def: FlowDefinition, id: string) =>
	editExits(def, id, (list) => [
		...list,
		def.steps[id]?.kind === 'measure' ? { next: '' } : { label: `Answer ${list.length + 1}`, next: '' }
	]);

export const removeExit = (def: FlowDefinition, id: string, index: number) =>
	editExits(def, id, (list) =>
		index >= 0 && index < list.length ? list.filter((_, i) => i !== index) : `There is no exit ${index + 1}.`
	);

/** Sets fields of one exit; a field set to undefined is removed (e.g. an open range bound). */
export const setExit = (def: FlowDefinition, id: string, index: number, patch: Partial<Outcome & Range>) =>
	editExits(def, id, (list) => {
		if (index < 0 || index >= list.length) return `There is no exit ${index + 1}.`;
		return list.map((c, i) => {
			if (i !== index) return c;
			const next = { ...c, ...patch } as Record<string, unknown>;
			for (const [k, v] of Object.entries(patch)) if (v === undefined) delete next[k];
			return next as Outcome | Range;
		});
	});

export const moveExit = (def: FlowDefinition, id: string, index: number, delta: -1 | 1) =>
	editExits(def, id, (list) => {
		const to = index + delta;
		if (index < 0 || index >= list.length) return `There is no exit ${index + 1}.`;
		if (to < 0 || to >= list.length) return list;
		const copy = [...list];
		[copy[index], copy[to]] = [copy[to], copy[index]];
		return copy;
	});

/** A new flow with one symptom step, for "start a new flow". */
export function newFlow(id: string, title: string): FlowDefinition {
	return {
		id,
		title,
		summary: '',
		symptoms: [],
		start: 'first-symptom',
		steps: { 'first-symptom': blankStep('symptom') }
	};
}
