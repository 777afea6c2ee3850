/**
 * compileFlow: a checked flow definition → an xstate v5 machine with one state per step.
 * The same machine runs in the browser (instant feedback) and on the server (re-validating every
 * event), so it is plain TypeScript: no Svelte, no database, no clock.
 */
import { assign, initialTransition, setup, transition, type SnapshotFrom } from 'xstate';
import { rangeFor } from './ranges';
import { exitsOf } from './exits';
import type { ChoiceStep, FlowDefinition, MeasureStep, Step } from './schema';

export { rangeFor, describeRange, type RangeResult } from './ranges';

export type FlowEvent =
	/** Pick an outcome of a symptom or test step by its 0-based index or its exact label. */
	| { type: 'ANSWER'; outcome: number | string; at?: string }
	/** Enter a reading for a measure step; refused (state unchanged) outside the domain or no number. */
	| { type: 'MEASURE'; value: number; at?: string }
	/** Undo the last answer or reading. */
	| { type: 'BACK' };

export type PathEntry =
	| {
			step: string;
			kind: 'symptom' | 'test';
			answer: { index: number; label: string };
			next: string;
			records?: string;
			/** Copied from the event when the caller supplies it (the machine reads no clock). */
			at?: string;
	  }
	| {
			step: string;
			kind: 'measure';
			reading: { value: number; unit: string; range: number };
			next: string;
			records?: string;
			at?: string;
	  };

export interface FlowContext {
	flowId: string;
	/** Every answer and reading so far, in order; BACK removes the last one. */
	path: PathEntry[];
}

export interface FlowOutput {
	flowId: string;
	verdict: string;
	path: PathEntry[];
}

/** Index of the outcome an ANSWER names, or -1. Labels must match exactly. */
export function resolveOutcome(step: ChoiceStep, outcome: unknown): number {
	const outcomes = step.outcomes ?? [];
	if (typeof outcome === 'number')
		return Number.isInteger(outcome) && outcome >= 0 && outcome < outcomes.length ? outcome : -1;
	if (typeof outcome === 'string') return outcomes.findIndex((o) => o.label === outcome);
	return -1;
}

export function compileFlow(definition: FlowDefinition) {
	const { steps } = definition;
	if (!Object.hasOwn(steps, definition.start))
		throw new Error(`Flow ${definition.id}: no start step "${definition.start}"`);
	const choice = (id: string) => steps[id] as ChoiceStep;
	const measure = (id: string) => steps[id] as MeasureStep;

	// BACK is a guarded transition to each graph predecessor: xstate targets are static.
	const predecessors = new Map<string, Set<string>>();
	for (const [id, step] of Object.entries(steps))
		for (const next of exitsOf(step)) {
			// Compile only checked flows; this guard names the fault instead of xstate's generic error.
			if (!Object.hasOwn(steps, next))
				throw new Error(`Flow ${definition.id}: step "${id}" leads to unknown step "${next}"`);
			if (!predecessors.has(next)) predecessors.set(next, new Set());
			predecessors.get(next)!.add(id);
		}

	const flowSetup = setup({
		types: {
			context: {} as FlowContext,
			events: {} as FlowEvent,
			output: {} as FlowOutput
		},
		guards: {
			answerIs: ({ event }, p: { step: string; index: number }) =>
				event.type === 'ANSWER' && resolveOutcome(choice(p.step), event.outcome) === p.index,
			readingIn: ({ event }, p: { step: string; index: number }) => {
				if (event.type !== 'MEASURE') return false;
				const r = rangeFor(measure(p.step), event.value);
				return r.ok && r.index === p.index;
			},
			cameFrom: ({ context }, p: { step: string }) => context.path.at(-1)?.step === p.step
		},
		actions: {
			recordAnswer: assign({
				path: ({ context, event }, p: { step: string; index: number }) => {
					const step = choice(p.step);
					const o = step.outcomes![p.index];
					const entry: PathEntry = {
						step: p.step,
						kind: step.kind,
						answer: { index: p.index, label: o.label },
						next: o.next
					};
					if (o.records) entry.records = o.records;
					if (event.type === 'ANSWER' && event.at) entry.at = event.at;
					return [...context.path, entry];
				}
			}),
			recordReading: assign({
				path: ({ context, event }, p: { step: string; index: number }) => {
					const step = measure(p.step);
					const r = step.ranges![p.index];
					const value = event.type === 'MEASURE' ? event.value : NaN;
					const entry: PathEntry = {
						step: p.step,
						kind: 'measure',
						reading: { value, unit: step.unit, range: p.index },
						next: r.next
					};
					if (r.records) entry.records = r.records;
					if (event.type === 'MEASURE' && event.at) entry.at = event.at;
					return [...context.path, entry];
				}
			}),
			forgetLast: assign({ path: ({ context }) => context.path.slice(0, -1) })
		}
	});

	const states: Record<string, object> = {};
	for (const [id, step] of Object.entries(steps)) {
		const back = [...(predecessors.get(id) ?? [])].map((from) => ({
			target: from,
			guard: { type: 'cameFrom' as const, params: { step: from } },
			actions: 'forgetLast' as const
		}));
		if (step.kind === 'verdict') {
			states[id] = { type: 'final', meta: { kind: step.kind, verdict: step.verdict.code } };
		} else if (step.kind === 'measure') {
			states[id] = {
				meta: { kind: step.kind },
				on: {
					MEASURE: (step.ranges ?? []).map((r, index) => ({
						target: r.next,
						guard: { type: 'readingIn' as const, params: { step: id, index } },
						actions: { type: 'recordReading' as const, params: { step: id, index } }
					})),
					BACK: back
				}
			};
		} else {
			states[id] = {
				meta: { kind: step.kind },
				on: {
					ANSWER: (step.outcomes ?? []).map((o, index) => ({
						target: o.next,
						guard: { type: 'answerIs' as const, params: { step: id, index } },
						actions: { type: 'recordAnswer' as const, params: { step: id, index } }
					})),
					BACK: back
				}
			};
		}
	}

	return flowSetup.createMachine({
		id: definition.id,
		initial: definition.start,
		context: { flowId: definition.id, path: [] },
		// The config is built dynamically from the definition; xstate cannot type-check it statically.
		states: states as never,
		output: ({ context }) => ({
			flowId: context.flowId,
			verdict: verdictOf(definition, context.path.at(-1)?.next),
			path: context.path
		})
	});
}

export type FlowMachine = ReturnType<typeof compileFlow>;
export type FlowSnapshot = SnapshotFrom<FlowMachine>;

function verdictOf(def: FlowDefinition, stepId: string | undefined): string {
	const step = stepId === undefined ? undefined : def.steps[stepId];
	return step?.kind === 'verdict' ? step.verdict.code : '';
}

/** The step the technician is on, with its id. */
export function currentStep(
	snapshot: { value: unknown },
	definition: FlowDefinition
): { id: string; step: Step } | undefined {
	const id = snapshot.value;
	if (typeof id !== 'string' || !Object.hasOwn(definition.steps, id)) return undefined;
	return { id, step: definition.steps[id] };
}

/**
 * One event applied purely (no actor): the server's re-validation of a client's step.
 * A refused event returns the same snapshot with `accepted: false`.
 */
export function applyEvent(
	machine: FlowMachine,
	snapshot: FlowSnapshot,
	event: FlowEvent
): { accepted: boolean; snapshot: FlowSnapshot } {
	if (snapshot.status !== 'active') return { accepted: false, snapshot };
	const [next] = transition(machine, snapshot, event);
	return { accepted: next !== snapshot, snapshot: next };
}

/** Replays a run's events from the start; stops at the first refused event. */
export function replay(
	machine: FlowMachine,
	events: readonly FlowEvent[]
): { snapshot: FlowSnapshot; refusedAt: number | null } {
	let [snapshot] = initialTransition(machine);
	for (let i = 0; i < events.length; i++) {
		const result = applyEvent(machine, snapshot, events[i]);
		if (!result.accepted) return { snapshot, refusedAt: i };
		snapshot = result.snapshot;
	}
	return { snapshot, refusedAt: null };
}

/** Why the step on screen would refuse an event, in words for the technician; null if it would not. */
export function refusal(definition: FlowDefinition, stepId: string, event: FlowEvent): string | null {
	const step = definition.steps[stepId];
	if (!step) return `The flow has no step "${stepId}".`;
	if (step.kind === 'verdict') return 'The flow has reached its verdict.';
	if (event.type === 'BACK') return null;
	if (step.kind === 'measure') {
		if (event.type !== 'MEASURE') return 'This step takes a reading, not an answer.';
		const r = rangeFor(step, event.value);
		return r.ok ? null : r.message;
	}
	if (event.type !== 'ANSWER') return 'This step takes an answer, not a reading.';
	return resolveOutcome(step, event.outcome) < 0
		? 'That answer is not one of the choices of this step.'
		: null;
}
