/**
 * Deciding one step event: one read, one write.
 *
 * Invariant: an event is decided against one consistent read of its run row (and, when needed, its
 * step facts), and written in one statement only while the run row still stands where it was read:
 * in progress, on the same step, with the same newest step number, which the write moves on by one.
 * So of two events decided against the same read only one is written; the other finds the run moved
 * and is decided again from a fresh read. The events of one run land one after the other, each
 * decided against the one before, and nothing is remembered between events, by this process or any
 * other. The first read assumes the event's key is new; a key already stored for the run fails the
 * write as a whole (a unique index), and every later read looks the key up, so a repeat returns the
 * stored result and a refusal is never sent for an event that had landed. An event that ends the
 * run writes its insights facts and audit entry in the same transaction as its step. Events of
 * different runs share nothing, so one that fails rolls back alone. The write is the database
 * function run_event_write (drizzle/0020_run_event_write.sql), which holds the same condition.
 */
import { getDb, type DB } from '$lib/server/db';
import { record } from '$lib/server/audit';
import { RuleError } from '$lib/server/errors';
import { bodyHash, keyReusedMessage } from '$lib/server/idempotency';
import { recordRunFinished } from '$lib/server/insights/facts';
import { dataSecureRefusal } from './data-secure';
import { planEvent } from '$lib/runs/plan';
import type { FlowEvent } from '$lib/flows/machine';
import type { RunEventInput, RunEventResult } from '$lib/runs/types';
import { eventFacts, isUuid, machineFor, stateOf, writeStep, type Actor, type StepWrite } from './queries';

/** How often an event overtaken by another of its run is decided again before giving up. */
const ATTEMPTS = 8;

/**
 * Applies one event to a run. A key seen before with the same body returns the stored result and
 * writes nothing (with a different body it is refused with 422); an event for a step that is no
 * longer current, or on a finished run, is refused with 409 and the current state; an outcome or
 * reading the pinned version does not allow is refused with 400.
 */
export async function recordEvent(
	runId: string,
	event: RunEventInput,
	actor: Actor
): Promise<RunEventResult> {
	if (!isUuid(runId)) throw new RuleError(404, 'not-found', 'No run with this id.');
	const db = await getDb();
	const hash = bodyHash(event);
	for (let attempt = 1; ; attempt++) {
		// PGlite answers on the main thread without real I/O, so events queued behind each other would
		// follow one another in microtasks and starve timers and sockets; one turn of the event loop
		// per event keeps the server responsive (bench/runs: longest stall).
		await new Promise((resolve) => setImmediate(resolve));
		const seen = attempt > 1;
		try {
			const result = await decide(db, runId, event, hash, actor, seen);
			if (result) return result;
		} catch (e) {
			// A refusal on the first read may be for a repeat whose event had landed: read it again with its key.
			if (!(isUniqueViolation(e) || (e instanceof RuleError && !seen && e.status !== 404))) throw e;
		}
		if (attempt === ATTEMPTS) {
			const { run } = await eventFacts(db, runId, { key: event.idempotencyKey, seen: false, back: false });
			throw new RuleError(409, 'stale-step', 'This run is changing too fast to answer; reload it.', {
				state: stateOf(run)
			});
		}
	}
}

/** The event's result, or null when the run moved between the read and the write. */
async function decide(
	db: DB,
	runId: string,
	event: RunEventInput,
	hash: string,
	actor: Actor,
	seen: boolean
): Promise<RunEventResult | null> {
	const facts = await eventFacts(db, runId, { key: event.idempotencyKey, seen, back: event.type === 'BACK' });
	const { run } = facts;
	if (facts.seen) {
		// Steps stored before body hashes were kept have none: a repeat is all they can be told from.
		if (facts.seen.hash && facts.seen.hash !== hash) throw new RuleError(422, 'key-reused', keyReusedMessage);
		return facts.seen.result;
	}
	if (run.status !== 'in-progress')
		throw new RuleError(
			409,
			'run-finished',
			run.status === 'completed' ? 'This run has reached its verdict.' : 'This run was abandoned.',
			{ state: stateOf(run) }
		);
	if (event.stepId !== run.currentStep)
		throw new RuleError(
			409,
			'stale-step',
			`This run has moved on: the current step is “${run.currentStep}”, not “${event.stepId}”.`,
			{ state: stateOf(run) }
		);

	const { definition, machine } = await machineFor(db, run.flowVersionId);
	const at = new Date();
	const planned = planEvent(definition, machine, run.snapshot, flowEvent(event), {
		revises: facts.last?.seq ?? 0,
		at: at.toISOString()
	});
	if (!planned.ok) throw new RuleError(400, 'invalid-event', planned.message);
	const { plan } = planned;

	// Checks of the planned target step (`plan.currentStep`) that can refuse the event go here, before
	// anything is written: throw a RuleError and nothing is written.
	// Data first (./data-secure.ts): held until the job records what became of the data.
	const held = await dataSecureRefusal(db, run, definition, {
		from: run.currentStep,
		to: plan.currentStep,
		back: event.type === 'BACK',
		reachable: plan.dataReachable
	});
	if (held) throw new RuleError(409, 'data-not-secured', held, { state: stateOf(run) });

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
	const write: StepWrite = {
		run,
		next,
		at,
		seq: facts.seq,
		kind: plan.kind,
		answer: plan.answer,
		notes: event.notes?.trim() ?? '',
		actorId: actor.id,
		key: event.idempotencyKey,
		hash,
		result,
		revises: event.type === 'BACK' ? (facts.last?.id ?? null) : null
	};
	if (!plan.done) return (await writeStep(db, write)) ? result : null;
	return db.transaction(async (tx) => {
		if (!(await writeStep(tx, write))) return null;
		// Insights: the finished run's flat facts row, with its last step (src/lib/server/insights/facts.ts).
		await recordRunFinished(tx, runId);
		await record(tx, {
			actorId: actor.id,
			action: 'run.complete',
			targetType: 'run',
			targetId: runId,
			details: { jobId: run.jobId, verdict: plan.verdictCode, dataReachable: plan.dataReachable }
		});
		return result;
	});
}

/** PostgreSQL's unique_violation (23505), however the driver or the ORM wraps it. */
function isUniqueViolation(e: unknown): boolean {
	for (let x = e; x && typeof x === 'object'; x = (x as { cause?: unknown }).cause)
		if ((x as { code?: unknown }).code === '23505') return true;
	return false;
}

/** The machine's event for an API event (the step id and key are the server's business). */
function flowEvent(event: RunEventInput): FlowEvent {
	if (event.type === 'ANSWER') return { type: 'ANSWER', outcome: event.outcome };
	if (event.type === 'MEASURE') return { type: 'MEASURE', value: event.value };
	return { type: 'BACK' };
}
