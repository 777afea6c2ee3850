/**
 * What one step event does to a run, decided by the compiled machine of the pinned flow version.
 * Isomorphic: the server plans every event with it before it writes (src/lib/server/runs/commit.ts),
 * and the run screen plans the same event with it to move on at once and to show the answer in the
 * revision trail, so the two cannot disagree about what an answer means.
 */
import { createActor } from 'xstate';
import {
	rangeFor,
	resolveOutcome,
	type FlowEvent,
	type FlowMachine,
	type PathEntry
} from '$lib/flows/machine';
import type { FlowDefinition } from '$lib/flows/schema';
import type { RunStepRecord } from './types';

/** What the path proves about the user data: a revised answer no longer counts. */
export function dataReachableOf(path: readonly PathEntry[]): boolean | null {
	if (path.some((p) => p.records === 'data-reachable')) return true;
	if (path.some((p) => p.records === 'data-unreachable')) return false;
	return null;
}

/** A persisted snapshot of the flow machine, as the run row stores it and the API sends it. */
export type StoredSnapshot = Record<string, unknown>;

/** An accepted event: where the run goes, and the step record it leaves behind. */
export type PlannedEvent = {
	snapshot: StoredSnapshot;
	/** The step the run stands on afterwards: the target step of the event. */
	currentStep: string;
	done: boolean;
	verdictCode: string | null;
	dataReachable: boolean | null;
	path: PathEntry[];
	kind: string;
	answer: RunStepRecord['answer'];
};

export type Plan = { ok: true; plan: PlannedEvent } | { ok: false; message: string };

/**
 * Plans `event` on the step the snapshot stands on. `revises` is the step number of the answer a
 * BACK revises (the newest one still standing), 0 if unknown; `at` is copied into the path.
 * A refusal says why in the technician's words.
 */
export function planEvent(
	definition: FlowDefinition,
	machine: FlowMachine,
	snapshot: StoredSnapshot,
	event: FlowEvent,
	{ revises = 0, at }: { revises?: number; at?: string } = {}
): Plan {
	const restored = createActor(machine, { snapshot: snapshot as never }).start();
	try {
		const before = restored.getSnapshot();
		const stepId = String(before.value);
		const step = definition.steps[stepId];
		if (!step) return refused('The current step is not in this flow.');
		let answer: PlannedEvent['answer'];
		let kind: string = step.kind;
		if (event.type === 'ANSWER') {
			if (step.kind !== 'symptom' && step.kind !== 'test')
				return refused(`“${step.title}” is a ${step.kind} step; it takes no outcome.`);
			const index = resolveOutcome(step, event.outcome);
			const outcomes = step.outcomes ?? [];
			if (index < 0)
				return refused(
					`“${String(event.outcome)}” is not an outcome of this step. Choose one of: ${outcomes
						.map((o, i) => `${i + 1} ${o.label}`)
						.join('; ')}.`
				);
			restored.send({ type: 'ANSWER', outcome: index, at });
			answer = { outcome: { index, label: outcomes[index].label } };
		} else if (event.type === 'MEASURE') {
			if (step.kind !== 'measure')
				return refused(`“${step.title}” is a ${step.kind} step; it takes no reading.`);
			const r = rangeFor(step, event.value);
			if (!r.ok) return refused(r.message);
			restored.send({ type: 'MEASURE', value: event.value, at });
			answer = {
				value: event.value,
				unit: step.unit,
				range: { index: r.index, label: r.range.label ?? null }
			};
		} else {
			if (before.context.path.length === 0)
				return refused('This is the first step: there is nothing to go back to.');
			restored.send({ type: 'BACK' });
			kind = 'back';
			answer = { back: { revised: revises } };
		}
		const after = restored.getSnapshot();
		// The checks above mirror the machine's guards; this catches any case where they disagree.
		if (after.context.path === before.context.path)
			return refused('The flow does not accept this answer here.');
		const currentStep = String(after.value);
		const target = definition.steps[currentStep];
		const done = after.status === 'done';
		return {
			ok: true,
			plan: {
				// Persisted before stop(): a stopped actor's snapshot says "stopped", and a machine
				// restored from it (here or in the browser) ignores every event.
				snapshot: restored.getPersistedSnapshot() as StoredSnapshot,
				currentStep,
				done,
				verdictCode: done && target?.kind === 'verdict' ? target.verdict.code : null,
				dataReachable: dataReachableOf(after.context.path),
				path: after.context.path,
				kind,
				answer
			}
		};
	} finally {
		restored.stop();
	}
}

function refused(message: string): Plan {
	return { ok: false, message };
}
