/**
 * Guided runs: a technician walks one pinned flow version for one job. The server is the authority:
 * every event is re-validated against the compiled machine of the pinned version, restored from the
 * stored snapshot, and the step, the snapshot and the run row change together (one statement, or one
 * transaction; see recordEvent).
 */
import { asc, desc, eq, sql, type SQL } from 'drizzle-orm';
import { createActor } from 'xstate';
import { getDb, type DB, type Tx } from '$lib/server/db';
import { flows, flowVersions, users } from '$lib/server/db/schema';
import { runs, runSteps, type Run, type StepAnswer } from '$lib/server/db/schema/runs';
import { record } from '$lib/server/audit';
import { recordRunFinished } from '$lib/server/insights/facts';
import * as jobQueries from '$lib/server/jobs/queries';
import * as flowLibrary from '$lib/server/flows/queries';
import { withStepOrder } from '$lib/server/flows/queries';
import {
	compileFlow,
	rangeFor,
	resolveOutcome,
	type FlowMachine,
	type FlowSnapshot
} from '$lib/flows/machine';
import type { FlowDefinition } from '$lib/flows/schema';
import type { RunEventInput, RunState, RunEventResult, RunDetail, RunSummary } from '$lib/runs/types';

export type { RunEventInput, RunState, RunEventResult, RunDetail, RunSummary };

/** A refusal with the HTTP status the API answers; `state` rides along on a 409. */
export class RunRuleError extends Error {
	constructor(
		public status: 400 | 404 | 409,
		public code:
			| 'not-found'
			| 'no-consent'
			| 'job-closed'
			| 'flow-not-published'
			| 'stale-step'
			| 'run-finished'
			| 'invalid-event',
		message: string,
		public state?: RunState
	) {
		super(message);
	}
}

type Actor = { id: string };

// Published versions never change, so their compiled machines can be kept for the process's life.
const compiled = new Map<string, { definition: FlowDefinition; machine: FlowMachine }>();

async function machineFor(tx: DB | Tx, versionId: string) {
	const hit = compiled.get(versionId);
	if (hit) return hit;
	const [row] = await tx.select().from(flowVersions).where(eq(flowVersions.id, versionId));
	if (!row) throw new RunRuleError(404, 'not-found', 'The flow version of this run is missing.');
	const definition = withStepOrder(row).definition;
	const entry = { definition, machine: compileFlow(definition) };
	if (row.status === 'published' || row.status === 'retired') compiled.set(versionId, entry);
	return entry;
}

const isUuid = (id: string) => /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id);

export function stateOf(run: Run): RunState {
	return {
		id: run.id,
		status: run.status,
		currentStep: run.currentStep,
		snapshot: run.snapshot,
		verdictCode: run.verdictCode,
		dataReachable: run.dataReachable,
		stepEnteredAt: run.updatedAt.toISOString()
	};
}

/** What the path proves about the user data: a revised answer no longer counts. */
function dataReachableOf(snapshot: FlowSnapshot): boolean | null {
	const path = snapshot.context.path;
	if (path.some((p) => p.records === 'data-reachable')) return true;
	if (path.some((p) => p.records === 'data-unreachable')) return false;
	return null;
}

/**
 * Starts a run of the current published version of `flowId` for a job. Refused without the
 * customer's consent to open the phone, on a closed job, and for a flow with no published version.
 * A job still "received" moves to "diagnosing" in the same transaction.
 */
export async function start(jobId: string, flowId: string, technician: Actor): Promise<Run> {
	const version = await flowLibrary.currentPublished(flowId);
	if (!version)
		throw new RunRuleError(
			400,
			'flow-not-published',
			'This flow has no published version (it is retired or still a draft); choose a published flow.'
		);
	const { machine } = await machineFor(await getDb(), version.id);
	const db = await getDb();
	return db.transaction(async (tx) => {
		const job = await lockJobOr404(tx, jobId);
		if (!job.consentToOpen)
			throw new RunRuleError(
				409,
				'no-consent',
				'The customer has not consented to opening the phone. Record their consent on the job before starting a run.'
			);
		if (job.status === 'collected' || job.status === 'cancelled')
			throw new RunRuleError(409, 'job-closed', 'This job is closed; a returning phone needs a new job.');
		const actor = createActor(machine).start();
		const snapshot = actor.getPersistedSnapshot() as Record<string, unknown>;
		actor.stop();
		const [run] = await tx
			.insert(runs)
			.values({
				jobId,
				flowVersionId: version.id,
				technicianId: technician.id,
				snapshot,
				currentStep: version.definition.start
			})
			.returning();
		if (job.status === 'received')
			await jobQueries.transition(
				jobId,
				'diagnosing',
				technician.id,
				`Run started: ${version.definition.title}`,
				tx
			);
		await record(tx, {
			actorId: technician.id,
			action: 'run.start',
			targetType: 'run',
			targetId: run.id,
			details: { jobId, flowId, version: version.version, versionId: version.id }
		});
		return run;
	});
}

async function lockJobOr404(tx: Tx, jobId: string) {
	try {
		return await jobQueries.lockJob(tx, jobId);
	} catch (e) {
		if (e instanceof jobQueries.JobRuleError && e.code === 'not-found')
			throw new RunRuleError(404, 'not-found', 'No job with this id.');
		throw e;
	}
}

async function lockRun(tx: Tx, runId: string): Promise<Run> {
	const [run] = isUuid(runId) ? await tx.select().from(runs).where(eq(runs.id, runId)).for('update') : [];
	if (!run) throw new RunRuleError(404, 'not-found', 'No run with this id.');
	return run;
}

/** What one event reads: the run, the stored result of its key, the next step number, the answer a BACK revises. */
type EventRead = {
	run: Run;
	seen: RunEventResult | null;
	seq: number;
	last: { id: number; seq: number } | null;
};

/** One statement, one snapshot: the run row and the three facts about its steps that an event needs. */
async function readForEvent(db: DB | Tx, runId: string, key: string): Promise<EventRead> {
	const [row] = await db
		.select({
			run: runs,
			seen: sql<RunEventResult | null>`(select rs.result from run_steps rs
				where rs.run_id = runs.id and rs.idempotency_key = ${key})`,
			seq: sql<number>`(select coalesce(max(rs.seq), 0)::int + 1 from run_steps rs where rs.run_id = runs.id)`,
			// The answer a BACK would revise: the newest one still standing (run_steps_standing_idx).
			last: sql<{ id: number; seq: number } | null>`(select json_build_object('id', rs.id, 'seq', rs.seq)
				from run_steps rs where rs.run_id = runs.id and rs.kind <> 'back' and rs.superseded_at is null
				order by rs.seq desc limit 1)`
		})
		.from(runs)
		.where(eq(runs.id, runId));
	if (!row) throw new RunRuleError(404, 'not-found', 'No run with this id.');
	return row;
}

/** An accepted event: the response, and what to write for it. */
type EventPlan = {
	result: RunEventResult;
	write: SQL;
	done: boolean;
	details: Record<string, unknown>;
};

/**
 * Checks an event against what was read and, when the pinned machine accepts it, plans the write:
 * the step row, a BACK's revision and the run row in one statement (data-modifying CTEs). The run
 * row changes only while it still stands where it was read (in progress, on the same step), and
 * the step row is written only with it; with the unique step number per run, two events planned
 * from the same read cannot both land.
 */
async function planEvent(
	db: DB | Tx,
	{ run, seq, last }: EventRead,
	event: RunEventInput,
	actor: Actor
): Promise<EventPlan> {
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

	const { definition, machine } = await machineFor(db, run.flowVersionId);
	const step = definition.steps[run.currentStep];
	if (!step) throw new RunRuleError(409, 'stale-step', 'The current step is not in this flow.', stateOf(run));
	const at = new Date();
	const restored = createActor(machine, { snapshot: run.snapshot as never }).start();
	const before = restored.getSnapshot();
	let answer: StepAnswer;
	let kind: string = step.kind;

	if (event.type === 'ANSWER') {
		if (step.kind !== 'symptom' && step.kind !== 'test')
			throw invalid(`“${step.title}” is a ${step.kind} step; it takes no outcome.`);
		const index = resolveOutcome(step, event.outcome);
		const outcomes = step.outcomes ?? [];
		if (index < 0)
			throw invalid(
				`“${String(event.outcome)}” is not an outcome of this step. Choose one of: ${outcomes
					.map((o, i) => `${i + 1} ${o.label}`)
					.join('; ')}.`
			);
		restored.send({ type: 'ANSWER', outcome: index, at: at.toISOString() });
		answer = { outcome: { index, label: outcomes[index].label } };
	} else if (event.type === 'MEASURE') {
		if (step.kind !== 'measure')
			throw invalid(`“${step.title}” is a ${step.kind} step; it takes no reading.`);
		const r = rangeFor(step, event.value);
		if (!r.ok) throw invalid(r.message);
		restored.send({ type: 'MEASURE', value: event.value as number, at: at.toISOString() });
		answer = {
			value: event.value as number,
			unit: step.unit,
			range: { index: r.index, label: r.range.label ?? null }
		};
	} else {
		if (before.context.path.length === 0)
			throw invalid('This is the first step: there is nothing to go back to.');
		restored.send({ type: 'BACK' });
		kind = 'back';
		answer = { back: { revised: 0 } };
	}
	const after = restored.getSnapshot();
	// Persist before stop(): a stopped actor's snapshot says "stopped", and a machine restored
	// from it (here or in the browser) ignores every event.
	const snapshot = restored.getPersistedSnapshot() as Record<string, unknown>;
	restored.stop();
	// The checks above mirror the machine's guards; this catches any case where they disagree.
	if (after.context.path === before.context.path) throw invalid('The flow does not accept this answer here.');

	const revises = event.type === 'BACK' ? last : null;
	if (revises) answer = { back: { revised: revises.seq } };

	const done = after.status === 'done';
	const currentStep = String(after.value);
	const verdictStep = done ? currentStep : null;
	const verdictCode =
		done && definition.steps[currentStep]?.kind === 'verdict'
			? (definition.steps[currentStep] as { verdict: { code: string } }).verdict.code
			: null;
	const next: Run = {
		...run,
		snapshot,
		currentStep,
		status: done ? 'completed' : 'in-progress',
		verdictCode,
		verdictStep,
		dataReachable: dataReachableOf(after),
		finishedAt: done ? at : null,
		updatedAt: at
	};
	const result: RunEventResult = { seq, state: stateOf(next) };
	const json = (value: unknown) => sql`${JSON.stringify(value)}::jsonb`;
	const time = (value: Date | null) => sql`${value ? value.toISOString() : null}::timestamptz`;
	const write = sql`
		with moved as (
			update runs set snapshot = ${json(snapshot)}, current_step = ${currentStep}, status = ${next.status},
				verdict_code = ${verdictCode}, verdict_step = ${verdictStep}, data_reachable = ${next.dataReachable},
				finished_at = ${time(next.finishedAt)}, updated_at = ${time(at)}
			where id = ${run.id} and status = 'in-progress' and current_step = ${run.currentStep}
			returning id
		), step as (
			insert into run_steps (run_id, seq, step_id, kind, answer, notes, actor_id, entered_at,
				answered_at, idempotency_key, result)
			select moved.id, ${seq}::int, ${run.currentStep}::text, ${kind}::text, ${json(answer)},
				${event.notes?.trim() ?? ''}::text, ${actor.id}::uuid, ${time(run.updatedAt)}, ${time(at)},
				${event.idempotencyKey}::text, ${json(result)}
			from moved
		)${
			revises
				? sql`, revised as (update run_steps set superseded_at = ${time(at)}
			where id = ${revises.id} and exists (select 1 from moved))`
				: sql``
		}
		select count(*)::int as applied from moved`;
	return {
		result,
		write,
		done,
		details: { jobId: run.jobId, verdict: verdictCode, dataReachable: next.dataReachable }
	};

	function invalid(message: string) {
		return new RunRuleError(400, 'invalid-event', message);
	}
}

/** Runs a planned write; false when the run no longer stood where it was read. */
async function applyPlan(db: DB | Tx, plan: EventPlan): Promise<boolean> {
	const rows = (await db.execute(plan.write)) as unknown as
		{ rows: { applied: number }[] } | { applied: number }[];
	const [first] = Array.isArray(rows) ? rows : rows.rows;
	return first?.applied === 1;
}

/** A unique index refused the row (PostgreSQL's unique_violation), however the driver wraps it. */
function isUniqueViolation(e: unknown): boolean {
	for (let c: unknown = e; c && typeof c === 'object'; c = (c as { cause?: unknown }).cause)
		if ((c as { code?: unknown }).code === '23505') return true;
	return false;
}

/**
 * Applies one event to a run. A key seen before returns the stored result and writes nothing; an
 * event for a step that is no longer current is refused with 409 and the current state; an outcome
 * or reading the pinned version does not allow is refused with 400.
 *
 * Most events take two statements and no explicit transaction: one read, then one conditional
 * write (see planEvent) that lands only if nothing changed the run in between. If something did
 * (another event on the same run, an abandon), or the event reaches the verdict (which also writes
 * the insights facts and the audit entry), the event is decided again inside a transaction that
 * holds the run's row lock, reading after the lock: on PostgreSQL (READ COMMITTED) a statement that
 * waited for a lock still sees the data as it was when it started, so the read must come after it.
 */
export async function recordEvent(
	runId: string,
	event: RunEventInput,
	actor: Actor
): Promise<RunEventResult> {
	if (!isUuid(runId)) throw new RunRuleError(404, 'not-found', 'No run with this id.');
	const db = await getDb();
	const read = await readForEvent(db, runId, event.idempotencyKey);
	if (read.seen) return read.seen;
	const plan = await planEvent(db, read, event, actor);
	if (!plan.done) {
		const applied = await applyPlan(db, plan).catch((e) => {
			if (isUniqueViolation(e)) return false;
			throw e;
		});
		if (applied) return plan.result;
	}
	return db.transaction(async (tx) => {
		await lockRun(tx, runId);
		const locked = await readForEvent(tx, runId, event.idempotencyKey);
		if (locked.seen) return locked.seen;
		const plan = await planEvent(tx, locked, event, actor);
		if (!(await applyPlan(tx, plan))) throw new Error(`run ${runId} changed while its row was locked`);
		if (plan.done) {
			// Insights: the finished run's flat facts row, in this transaction (src/lib/server/insights/facts.ts).
			await recordRunFinished(tx, runId);
			await record(tx, {
				actorId: actor.id,
				action: 'run.complete',
				targetType: 'run',
				targetId: runId,
				details: plan.details
			});
		}
		return plan.result;
	});
}

/** Stops a run that is under way; the reason is kept with it. */
export async function abandon(runId: string, reason: string, actor: Actor): Promise<Run> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const run = await lockRun(tx, runId);
		if (run.status !== 'in-progress')
			throw new RunRuleError(
				409,
				'run-finished',
				run.status === 'completed'
					? 'This run has reached its verdict already.'
					: 'This run was abandoned already.',
				stateOf(run)
			);
		const now = new Date();
		const [updated] = await tx
			.update(runs)
			.set({ status: 'abandoned', abandonReason: reason.trim(), finishedAt: now, updatedAt: now })
			.where(eq(runs.id, runId))
			.returning();
		await recordRunFinished(tx, runId); // Insights: facts row of the abandoned run (insights/facts.ts).
		await record(tx, {
			actorId: actor.id,
			action: 'run.abandon',
			targetType: 'run',
			targetId: runId,
			details: { jobId: run.jobId, step: run.currentStep, reason: reason.trim() }
		});
		return updated;
	});
}

/** A run with its pinned definition and every stored step, revised ones included. */
export async function get(runId: string): Promise<RunDetail | undefined> {
	if (!isUuid(runId)) return undefined;
	const db = await getDb();
	const [row] = await db
		.select({ run: runs, version: flowVersions, technicianName: users.name })
		.from(runs)
		.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
		.leftJoin(users, eq(users.id, runs.technicianId))
		.where(eq(runs.id, runId));
	if (!row) return undefined;
	const steps = await db
		.select({
			seq: runSteps.seq,
			stepId: runSteps.stepId,
			kind: runSteps.kind,
			answer: runSteps.answer,
			notes: runSteps.notes,
			enteredAt: runSteps.enteredAt,
			answeredAt: runSteps.answeredAt,
			supersededAt: runSteps.supersededAt
		})
		.from(runSteps)
		.where(eq(runSteps.runId, runId))
		.orderBy(asc(runSteps.seq));
	const version = withStepOrder(row.version);
	const { run } = row;
	return {
		...stateOf(run),
		jobId: run.jobId,
		technicianId: run.technicianId,
		technicianName: row.technicianName,
		verdictStep: run.verdictStep,
		abandonReason: run.abandonReason,
		startedAt: run.startedAt.toISOString(),
		finishedAt: run.finishedAt?.toISOString() ?? null,
		flow: {
			id: version.flowId,
			versionId: version.id,
			version: version.version ?? 0,
			definition: version.definition
		},
		steps: steps.map((s) => ({
			...s,
			enteredAt: s.enteredAt.toISOString(),
			answeredAt: s.answeredAt.toISOString(),
			supersededAt: s.supersededAt?.toISOString() ?? null
		}))
	};
}

/** The runs of a job, newest first, for the job page. */
export async function listForJob(jobId: string): Promise<RunSummary[]> {
	if (!isUuid(jobId)) return [];
	const db = await getDb();
	const rows = await db
		.select({
			id: runs.id,
			status: runs.status,
			currentStep: runs.currentStep,
			verdictCode: runs.verdictCode,
			dataReachable: runs.dataReachable,
			startedAt: runs.startedAt,
			finishedAt: runs.finishedAt,
			flowId: flowVersions.flowId,
			flowTitle: flows.title,
			version: flowVersions.version,
			technicianName: users.name,
			answers: sql<number>`(select count(*)::int from ${runSteps} where ${runSteps.runId} = ${runs.id} and ${runSteps.kind} <> 'back' and ${runSteps.supersededAt} is null)`
		})
		.from(runs)
		.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
		.innerJoin(flows, eq(flows.id, flowVersions.flowId))
		.leftJoin(users, eq(users.id, runs.technicianId))
		.where(eq(runs.jobId, jobId))
		.orderBy(desc(runs.startedAt));
	return rows.map((r) => ({
		...r,
		version: r.version ?? 0,
		startedAt: r.startedAt.toISOString(),
		finishedAt: r.finishedAt?.toISOString() ?? null
	}));
}
