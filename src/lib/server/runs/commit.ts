/**
 * Deciding one step event: one transaction per event.
 *
 * Invariant: an event is checked and written inside one transaction that holds its run's row lock
 * (`SELECT … FOR UPDATE`), and everything it is checked against is read after that lock, as its own
 * statement. So the events of one run are decided one after the other, each against what the one
 * before it committed, and nothing lands on a run that moved after it was checked; the unique step
 * number and key per run back this up. Events of different runs share nothing but the connection:
 * each has its own transaction, so one that fails (a bad string, a refused answer, a database
 * error) rolls back alone and never fails another.
 */
import { getDb, type Tx } from '$lib/server/db';
import { record } from '$lib/server/audit';
import { recordRunFinished } from '$lib/server/insights/facts';
import { dataSecureRefusal } from './data-secure';
import { planEvent } from '$lib/runs/plan';
import type { FlowEvent } from '$lib/flows/machine';
import type { RunEventInput, RunEventResult } from '$lib/runs/types';
import {
	isUuid,
	lockRun,
	machineFor,
	RunRuleError,
	stateOf,
	stepFacts,
	writeStep,
	type Actor
} from './queries';

/**
 * Applies one event to a run. A key seen before returns the stored result and writes nothing; an
 * event for a step that is no longer current, or on a finished run, is refused with 409 and the
 * current state; an outcome or reading the pinned version does not allow is refused with 400.
 */
export async function recordEvent(
	runId: string,
	event: RunEventInput,
	actor: Actor
): Promise<RunEventResult> {
	if (!isUuid(runId)) throw new RunRuleError(404, 'not-found', 'No run with this id.');
	const db = await getDb();
	return db.transaction(async (tx) => {
		// PGlite answers on the main thread without real I/O, so queued transactions would follow one
		// another in microtasks and starve timers and sockets; one turn of the event loop per event
		// keeps the server responsive (bench/runs: longest stall).
		await new Promise((resolve) => setImmediate(resolve));
		return decide(tx, runId, event, actor);
	});
}

async function decide(tx: Tx, runId: string, event: RunEventInput, actor: Actor): Promise<RunEventResult> {
	const run = await lockRun(tx, runId);
	const facts = await stepFacts(tx, runId, event.idempotencyKey, event.type === 'BACK');
	if (facts.seen) return facts.seen;
	if (run.status !== 'in-progress')
		throw new RunRuleError(
			409,
			'run-finished',
			run.status === 'completed' ? 'This run has reached its verdict.' : 'This run was abandoned.',
			stateOf(run)
		);
	if (event.stepId !== run.currentStep)
		throw new RunRuleError(
			409,
			'stale-step',
			`This run has moved on: the current step is “${run.currentStep}”, not “${event.stepId}”.`,
			stateOf(run)
		);

	const { definition, machine } = await machineFor(tx, run.flowVersionId);
	const at = new Date();
	const planned = planEvent(definition, machine, run.snapshot, flowEvent(event), {
		revises: facts.last?.seq ?? 0,
		at: at.toISOString()
	});
	if (!planned.ok) throw new RunRuleError(400, 'invalid-event', planned.message);
	const { plan } = planned;

	// Checks of the planned target step (`plan.currentStep`) that can refuse the event go here, before
	// anything is written: throw a RunRuleError and the transaction writes nothing.
	// Data first (./data-secure.ts): held until the job records what became of the data.
	const held = await dataSecureRefusal(tx, run, definition, {
		from: run.currentStep,
		to: plan.currentStep,
		back: event.type === 'BACK',
		reachable: plan.dataReachable
	});
	if (held) throw new RunRuleError(409, 'data-not-secured', held, stateOf(run));

	const next = {
		snapshot: plan.snapshot,
		currentStep: plan.currentStep,
		status: plan.done ? ('completed' as const) : ('in-progress' as const),
		verdictCode: plan.verdictCode,
		verdictStep: plan.done ? plan.currentStep : null,
		dataReachable: plan.dataReachable,
		finishedAt: plan.done ? at : null
	};
	const result: RunEventResult = { seq: facts.seq, state: stateOf({ ...run, ...next, updatedAt: at }) };
	await writeStep(tx, {
		run,
		next,
		at,
		seq: facts.seq,
		kind: plan.kind,
		answer: plan.answer,
		notes: event.notes?.trim() ?? '',
		actorId: actor.id,
		key: event.idempotencyKey,
		result,
		revises: event.type === 'BACK' ? (facts.last?.id ?? null) : null
	});
	if (plan.done) {
		// Insights: the finished run's flat facts row, in this transaction (src/lib/server/insights/facts.ts).
		await recordRunFinished(tx, runId);
		await record(tx, {
			actorId: actor.id,
			action: 'run.complete',
			targetType: 'run',
			targetId: runId,
			details: { jobId: run.jobId, verdict: plan.verdictCode, dataReachable: plan.dataReachable }
		});
	}
	return result;
}

/** The machine's event for an API event (the step id and key are the server's business). */
function flowEvent(event: RunEventInput): FlowEvent {
	if (event.type === 'ANSWER') return { type: 'ANSWER', outcome: event.outcome };
	if (event.type === 'MEASURE') return { type: 'MEASURE', value: event.value };
	return { type: 'BACK' };
}
