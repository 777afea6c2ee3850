// Over 300 lines on purpose: the run queries (start, abandon, reads, and the step event's read and write) share one table pair and its types.
/**
 * Guided runs: a technician walks one pinned flow version for one job. These are the run queries:
 * start, abandon, read, and the reads and writes a step event makes; the event itself is decided in
 * ./commit.ts.
 */
import { asc, desc, eq, sql } from 'drizzle-orm';
import { createActor } from 'xstate';
import { getDb, type DB, type Tx } from '$lib/server/db';
import { flows, flowVersions, users } from '$lib/server/db/schema';
import { runs, runSteps, type Run, type StepAnswer } from '$lib/server/db/schema/runs';
import { record } from '$lib/server/audit';
import { RuleError } from '$lib/server/errors';
import { recordRunFinished } from '$lib/server/insights/facts';
import { noteJob } from './data-secure';
import * as jobQueries from '$lib/server/jobs/queries';
import * as flowLibrary from '$lib/server/flows/queries';
import { withStepOrder } from '$lib/server/flows/queries';
import { compileFlow, type FlowMachine } from '$lib/flows/machine';
import type { FlowDefinition } from '$lib/flows/schema';
import type { RunEventInput, RunState, RunEventResult, RunDetail, RunSummary } from '$lib/runs/types';

export type { RunEventInput, RunState, RunEventResult, RunDetail, RunSummary };

export type Actor = { id: string };

// Published versions never change, so their compiled machines can be kept for the process's life.
const compiled = new Map<string, { definition: FlowDefinition; machine: FlowMachine }>();

/** Forgets the compiled machines (caches.ts). */
export function forgetCompiled() {
	compiled.clear();
}

export async function machineFor(tx: DB | Tx, versionId: string) {
	const hit = compiled.get(versionId);
	if (hit) return hit;
	const [row] = await tx.select().from(flowVersions).where(eq(flowVersions.id, versionId));
	if (!row) throw new RuleError(404, 'not-found', 'The flow version of this run is missing.');
	const definition = withStepOrder(row).definition;
	const entry = { definition, machine: compileFlow(definition) };
	if (row.status === 'published' || row.status === 'retired') compiled.set(versionId, entry);
	return entry;
}

export const isUuid = (id: string) =>
	/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id);

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

/**
 * Starts a run of the current published version of `flowId` for a job. Refused without the
 * customer's consent to open the phone, on a closed job, and for a flow with no published version.
 * A job still "received" moves to "diagnosing" in the same transaction.
 */
export async function start(jobId: string, flowId: string, technician: Actor): Promise<Run> {
	const version = await flowLibrary.currentPublished(flowId);
	if (!version)
		throw new RuleError(
			400,
			'flow-not-published',
			'This flow has no published version (it is retired or still a draft); choose a published flow.'
		);
	const db = await getDb();
	const { machine } = await machineFor(db, version.id);
	return db.transaction(async (tx) => {
		const job = await jobQueries.lockJob(tx, jobId);
		if (!job.consentToOpen)
			throw new RuleError(
				409,
				'no-consent',
				'The customer has not consented to opening the phone. Record their consent on the job before starting a run.'
			);
		if (job.status === 'collected' || job.status === 'cancelled')
			throw new RuleError(409, 'job-closed', 'This job is closed; a returning phone needs a new job.');
		noteJob(job); // data first: a job that is not data-first is never read again for it (./data-secure.ts)
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

/** Takes the run's row lock for the rest of the transaction; 404 for no such run. */
export async function lockRun(tx: Tx, runId: string): Promise<Run> {
	const [run] = isUuid(runId) ? await tx.select().from(runs).where(eq(runs.id, runId)).for('update') : [];
	if (!run) throw new RuleError(404, 'not-found', 'No run with this id.');
	return run;
}

/**
 * One consistent read of what an event is decided against (one statement, so all of it is as of one
 * moment): the run row, whose `last_seq` gives the next step number; with `seen`, the stored result
 * and body hash of the event's key; for a BACK, the answer it would revise (the newest one still
 * standing; run_steps_standing_idx). ANSWER and MEASURE spare that look-up, and ./commit.ts asks
 * for the key only once the event did not simply land.
 */
export async function eventFacts(db: DB, runId: string, want: { key: string; seen: boolean; back: boolean }) {
	const [row] = await factsQuery(db, want.seen, want.back).execute({ id: runId, key: want.key });
	if (!row) throw new RuleError(404, 'not-found', 'No run with this id.');
	return { ...row, seq: row.run.lastSeq + 1 };
}

// The read is prepared once per database handle and variant: building a select costs about as much
// CPU as PGlite takes to answer it, and this is the busiest read of a shop's day.
type FactsQuery = ReturnType<ReturnType<typeof factsSelect>['prepare']>;
const prepared = new WeakMap<DB, Map<string, FactsQuery>>();

function factsQuery(db: DB, seen: boolean, back: boolean) {
	const name = `run_event_facts_${+seen}${+back}`;
	let byName = prepared.get(db);
	if (!byName) prepared.set(db, (byName = new Map()));
	let query = byName.get(name);
	if (!query) byName.set(name, (query = factsSelect(db, seen, back).prepare(name)));
	return query;
}

function factsSelect(db: DB, seen: boolean, back: boolean) {
	return db
		.select({
			run: runs,
			seen: seen
				? sql<{ result: RunEventResult; hash: string | null } | null>`(select
				json_build_object('result', rs.result, 'hash', rs.body_hash) from run_steps rs
				where rs.run_id = runs.id and rs.idempotency_key = ${sql.placeholder('key')})`
				: sql<null>`null`,
			last: back
				? sql<{ id: number; seq: number } | null>`(select json_build_object('id', rs.id, 'seq', rs.seq)
				from run_steps rs where rs.run_id = runs.id and rs.kind <> 'back' and rs.superseded_at is null
				order by rs.seq desc limit 1)`
				: sql<null>`null`
		})
		.from(runs)
		.where(eq(runs.id, sql.placeholder('id')));
}

/** One accepted event as it is stored: the step row, a BACK's revision, and the run row. */
export type StepWrite = {
	run: Run;
	next: Pick<
		Run,
		'snapshot' | 'currentStep' | 'status' | 'verdictCode' | 'verdictStep' | 'dataReachable' | 'finishedAt'
	>;
	at: Date;
	seq: number;
	kind: string;
	answer: StepAnswer;
	notes: string;
	actorId: string;
	key: string;
	/** The event's body hash (src/lib/server/idempotency.ts). */
	hash: string;
	result: RunEventResult;
	/** The run_steps row a BACK supersedes. */
	revises: number | null;
};

/**
 * Writes an accepted event with one call of the database function `run_event_write`
 * (drizzle/0020_run_event_write.sql): the run row, then the step row as number `seq` and a BACK's
 * revision, only if the run row still stands where the event was decided: in progress, on the same
 * step, with the same newest step number. Returns false when it does not (nothing written). A key
 * already stored for the run fails the call as a whole: see ./commit.ts.
 */
export async function writeStep(db: DB | Tx, w: StepWrite): Promise<boolean> {
	const { run, next } = w;
	const json = (v: unknown) => JSON.stringify(v);
	const rows = await db.execute<{ wrote: boolean }>(sql`select run_event_write(
		${run.id}::uuid, ${run.currentStep}, ${w.seq}::integer, ${w.revises}::bigint,
		${json(next.snapshot)}::jsonb, ${next.currentStep}, ${next.status}, ${next.verdictCode}, ${next.verdictStep},
		${next.dataReachable}::boolean, ${next.finishedAt?.toISOString() ?? null}::timestamptz,
		${w.at.toISOString()}::timestamptz, ${run.updatedAt.toISOString()}::timestamptz,
		${w.kind}, ${json(w.answer)}::jsonb, ${w.notes}, ${w.actorId}::uuid, ${w.key}, ${w.hash},
		${json(w.result)}::jsonb) as wrote`);
	const list = Array.isArray(rows) ? rows : (rows as { rows: { wrote: boolean }[] }).rows;
	return list[0]?.wrote === true;
}

/** Stops a run that is under way; the reason is kept with it. */
export async function abandon(runId: string, reason: string, actor: Actor): Promise<Run> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const run = await lockRun(tx, runId);
		if (run.status !== 'in-progress')
			throw new RuleError(
				409,
				'run-finished',
				run.status === 'completed'
					? 'This run has reached its verdict already.'
					: 'This run was abandoned already.',
				{ state: stateOf(run) }
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
