/**
 * Where the run stands on this screen: the last state the server confirmed (the base) with the
 * waiting events planned on top, in order, by the same compiled machine the server uses
 * (src/lib/runs/plan.ts). So a reload while offline shows exactly what the technician entered.
 */
import type { FlowEvent, FlowMachine } from '$lib/flows/machine';
import type { FlowDefinition } from '$lib/flows/schema';
import { planEvent, type PlannedEvent, type StoredSnapshot } from '$lib/runs/plan';
import type { RunDetail, RunEventInput, RunStepRecord } from '$lib/runs/types';
import { seqOf, type EventEntry } from './outbox';

export function flowEventOf(body: RunEventInput): FlowEvent {
	if (body.type === 'ANSWER') return { type: 'ANSWER', outcome: body.outcome };
	if (body.type === 'MEASURE') return { type: 'MEASURE', value: body.value };
	return { type: 'BACK' };
}

export const stepOf = (snapshot: StoredSnapshot) => String(snapshot.value);

/** The trail after one more answer; a Back marks the newest standing answer as revised. */
export function appendRecord(
	trail: readonly RunStepRecord[],
	body: RunEventInput,
	plan: PlannedEvent,
	seq: number,
	at: string
): RunStepRecord[] {
	const next = trail.map((t) => ({ ...t }));
	let answer = plan.answer;
	if ('back' in answer) {
		const last = next.findLast((t) => t.kind !== 'back' && !t.supersededAt);
		if (last) last.supersededAt = at;
		answer = { back: { revised: last?.seq ?? 0 } };
	}
	next.push({
		seq,
		stepId: body.stepId,
		kind: plan.kind,
		answer,
		notes: body.notes ?? '',
		enteredAt: at,
		answeredAt: at,
		supersededAt: null
	});
	return next;
}

export type Standing = {
	snapshot: StoredSnapshot;
	trail: RunStepRecord[];
	/** When the step on screen was reached (ms), for the timer. */
	enteredAt: number;
	/** Waiting events that no longer fit (the base moved on under them): the server will refuse them. */
	unfit: EventEntry[];
};

export function standingOf(
	definition: FlowDefinition,
	machine: FlowMachine,
	base: RunDetail,
	events: readonly EventEntry[]
): Standing {
	let snapshot = base.snapshot as StoredSnapshot;
	let trail = base.steps;
	let enteredAt = Date.parse(base.stepEnteredAt);
	let seq = seqOf(base);
	const unfit: EventEntry[] = [];
	for (const e of events) {
		const planned =
			unfit.length || e.body.stepId !== stepOf(snapshot)
				? undefined
				: planEvent(definition, machine, snapshot, flowEventOf(e.body));
		if (!planned?.ok) {
			unfit.push(e);
			continue;
		}
		snapshot = planned.plan.snapshot;
		trail = appendRecord(trail, e.body, planned.plan, ++seq, new Date(e.queuedAt).toISOString());
		enteredAt = e.queuedAt;
	}
	return { snapshot, trail, enteredAt, unfit };
}
