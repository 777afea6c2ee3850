/**
 * Guided runs: a technician walks one pinned flow version for one job. The server is the authority:
 * every event is re-validated against the compiled machine of the pinned version, restored from the
 * stored snapshot, and the step, the snapshot and the run row change together (one statement, or one
 * transaction; see recordEvent).
 */
import { asc, desc, eq, inArray, sql } from 'drizzle-orm';
import { createActor } from 'xstate';
import { getDb, type DB, type Tx } from '$lib/server/db';
import { flows, flowVersions, users } from '$lib/server/db/schema';
import { runs, runSteps, type Run, type StepAnswer } from '$lib/server/db/schema/runs';
import { record } from '$lib/server/audit';
import { recordRunFinished } from '$lib/server/insights/facts';
import { dataSecureRefusal, noteJob } from './data-secure';
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
			| 'invalid-event'
			| 'data-not-secured',
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

/**
 * One statement, one snapshot: for each (run, idempotency key), the run row and the three facts
 * about its steps that an event needs. Runs that do not exist are missing from the map.
 */
async function readForEvents(
	db: DB | Tx,
	wanted: { runId: string; key: string }[]
): Promise<Map<string, EventRead>> {
	const keys = JSON.stringify(Object.fromEntries(wanted.map((w) => [w.runId, w.key])));
	const rows = await db
		.select({
			run: runs,
			seen: sql<RunEventResult | null>`(select rs.result from run_steps rs
				where rs.run_id = runs.id and rs.idempotency_key = (${keys}::jsonb ->> runs.id::text))`,
			seq: sql<number>`(select coalesce(max(rs.seq), 0)::int + 1 from run_steps rs where rs.run_id = runs.id)`,
			// The answer a BACK would revise: the newest one still standing (run_steps_standing_idx).
			last: sql<{ id: number; seq: number } | null>`(select json_build_object('id', rs.id, 'seq', rs.seq)
				from run_steps rs where rs.run_id = runs.id and rs.kind <> 'back' and rs.superseded_at is null
				order by rs.seq desc limit 1)`
		})
		.from(runs)
		.where(
			inArray(
				runs.id,
				wanted.map((w) => w.runId)
			)
		);
	return new Map(rows.map((r) => [r.run.id, r]));
}

async function readForEvent(db: DB | Tx, runId: string, key: string): Promise<EventRead> {
	const read = (await readForEvents(db, [{ runId, key }])).get(runId);
	if (!read) throw new RunRuleError(404, 'not-found', 'No run with this id.');
	return read;
}

/** An accepted event: the response, and what to write for it. */
type EventPlan = {
	result: RunEventResult;
	write: StepWrite;
	/** The run as it stands once the write lands. */
	next: Run;
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

	// Data first (./data-secure.ts): held until the job records what became of the data.
	const held = await dataSecureRefusal(db, run, definition, {
		from: run.currentStep,
		to: String(after.value),
		back: event.type === 'BACK',
		reachable: dataReachableOf(after)
	});
	if (held) throw new RunRuleError(409, 'data-not-secured', held, stateOf(run));

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
	const write: StepWrite = {
		run_id: run.id,
		from_step: run.currentStep,
		snapshot,
		current_step: currentStep,
		status: next.status,
		verdict_code: verdictCode,
		verdict_step: verdictStep,
		data_reachable: next.dataReachable,
		finished_at: next.finishedAt?.toISOString() ?? null,
		at: at.toISOString(),
		seq,
		kind,
		answer,
		notes: event.notes?.trim() ?? '',
		actor_id: actor.id,
		entered_at: run.updatedAt.toISOString(),
		key: event.idempotencyKey,
		// The response, stored for a repeated key; its snapshot is the run's, added in SQL (writeSteps).
		result: { seq, state: { ...result.state, snapshot: undefined } },
		revises: revises?.id ?? null
	};
	return {
		result,
		write,
		next,
		done,
		details: { jobId: run.jobId, verdict: verdictCode, dataReachable: next.dataReachable }
	};

	function invalid(message: string) {
		return new RunRuleError(400, 'invalid-event', message);
	}
}

/** One accepted event as the write statement takes it (a JSON record, snake_case as the columns). */
type StepWrite = {
	run_id: string;
	/** The step the event was checked at: the run row changes only if it still stands there. */
	from_step: string;
	snapshot: Record<string, unknown>;
	current_step: string;
	status: string;
	verdict_code: string | null;
	verdict_step: string | null;
	data_reachable: boolean | null;
	finished_at: string | null;
	at: string;
	seq: number;
	kind: string;
	answer: StepAnswer;
	notes: string;
	actor_id: string;
	entered_at: string;
	key: string;
	/** The response without its snapshot (the run's `snapshot` above goes in its place). */
	result: { seq: number; state: Omit<RunState, 'snapshot'> & { snapshot: undefined } };
	/** The run_steps row a BACK supersedes. */
	revises: number | null;
};

/**
 * Writes accepted events of different runs in one statement (data-modifying CTEs over a JSON
 * recordset): each run row changes only while it is still in progress on the step its event was
 * checked at, and the step row and a BACK's revision are written only with it; with the unique step
 * number per run, two events planned from the same read cannot both land. Returns, for each run
 * whose event landed, the id of its new step row.
 */
async function writeSteps(db: DB | Tx, writes: StepWrite[]): Promise<Map<string, Landed>> {
	const result = (await db.execute(sql`
		with input as (
			select * from jsonb_to_recordset(${JSON.stringify(writes)}::jsonb) as i(run_id uuid, from_step text,
				snapshot jsonb, current_step text, status text, verdict_code text, verdict_step text,
				data_reachable boolean, finished_at timestamptz, at timestamptz, seq int, kind text, answer jsonb,
				notes text, actor_id uuid, entered_at timestamptz, key text, result jsonb, revises bigint)
		), moved as (
			update runs set snapshot = i.snapshot, current_step = i.current_step, status = i.status,
				verdict_code = i.verdict_code, verdict_step = i.verdict_step, data_reachable = i.data_reachable,
				finished_at = i.finished_at, updated_at = i.at
			from input i
			where runs.id = i.run_id and runs.status = 'in-progress' and runs.current_step = i.from_step
			returning runs.id
		), step as (
			insert into run_steps (run_id, seq, step_id, kind, answer, notes, actor_id, entered_at,
				answered_at, idempotency_key, result)
			select i.run_id, i.seq, i.from_step, i.kind, i.answer, i.notes, i.actor_id, i.entered_at, i.at, i.key,
				jsonb_set(i.result, '{state,snapshot}', i.snapshot)
			from input i join moved on moved.id = i.run_id
			returning run_id, id
		), revised as (
			update run_steps set superseded_at = i.at
			from input i join moved on moved.id = i.run_id
			where run_steps.id = i.revises
		)
		select step.run_id, step.id::int as id,
			case when i.kind = 'back' then (select json_build_object('id', rs.id, 'seq', rs.seq) from run_steps rs
				where rs.run_id = i.run_id and rs.kind <> 'back' and rs.superseded_at is null and rs.id <> i.revises
				order by rs.seq desc limit 1)
			else json_build_object('id', step.id, 'seq', i.seq) end as last
		from step join input i on i.run_id = step.run_id`)) as unknown as { rows: Landed[] } | Landed[];
	return new Map((Array.isArray(result) ? result : result.rows).map((r) => [r.run_id, r]));
}

/** A landed event: its step row and the answer the run's next BACK would revise. */
type Landed = { run_id: string; id: number; last: { id: number; seq: number } | null };

/** A unique index refused the row (PostgreSQL's unique_violation), however the driver wraps it. */
function isUniqueViolation(e: unknown): boolean {
	for (let c: unknown = e; c && typeof c === 'object'; c = (c as { cause?: unknown }).cause)
		if ((c as { code?: unknown }).code === '23505') return true;
	return false;
}

type Pending = {
	runId: string;
	event: RunEventInput;
	actor: Actor;
	resolve: (r: RunEventResult) => void;
	reject: (e: unknown) => void;
};

let waiting: Pending[] = [];

/**
 * Applies one event to a run. A key seen before returns the stored result and writes nothing; an
 * event for a step that is no longer current is refused with 409 and the current state; an outcome
 * or reading the pinned version does not allow is refused with 400.
 *
 * Events that arrive together (in one turn of the event loop) are decided together: one read for
 * all their runs, each checked against its pinned machine, then one conditional write for all
 * (writeSteps) — group commit, so that 16 technicians cost two statements, not thirty-two. An event
 * whose run changed between read and write (another event on the same run, an abandon), a second
 * event for a run in the same group, and an event that reaches the verdict (which also writes the
 * insights facts and the audit entry) are decided again, one by one, in a transaction that holds
 * the run's row lock and reads after it: on PostgreSQL (READ COMMITTED) a statement that waited for
 * a lock still sees the data as it was when it started, so the read must come after the lock.
 */
export function recordEvent(runId: string, event: RunEventInput, actor: Actor): Promise<RunEventResult> {
	if (!isUuid(runId)) return Promise.reject(new RunRuleError(404, 'not-found', 'No run with this id.'));
	return new Promise((resolve, reject) => {
		if (waiting.length === 0) setImmediate(() => void decideGroup());
		waiting.push({ runId, event, actor, resolve, reject });
	});
}

/**
 * Where each run stood after the last event this process wrote for it: the next event on that run
 * is checked against this instead of a fresh read. It is only ever a guess: the write still lands
 * only if the run stands where the guess says (writeSteps), an event the guess refuses is decided
 * again under the lock from the database, and any other change of a run here (a locked decision,
 * an abandon) forgets the run.
 */
const standing = new Map<string, EventRead>();
const STANDING_MAX = 2000;

function remember(runId: string, read: EventRead) {
	standing.delete(runId);
	standing.set(runId, read);
	if (standing.size > STANDING_MAX) standing.delete(standing.keys().next().value as string);
}

/** Runs with an event between its check and its write: the next one waits for the lock instead. */
const inFlight = new Set<string>();

async function decideGroup() {
	const group = waiting;
	waiting = [];
	const first = new Map<string, Pending>();
	const alone: Pending[] = [];
	for (const p of group) {
		if (first.has(p.runId) || inFlight.has(p.runId)) alone.push(p);
		else first.set(p.runId, p);
	}
	const planned: { pending: Pending; plan: EventPlan; guessed: boolean }[] = [];
	for (const runId of first.keys()) inFlight.add(runId);
	try {
		// The guesses as they are now: another decision on the same run may forget one meanwhile.
		const guesses = new Map<string, EventRead>();
		for (const runId of first.keys()) {
			const guess = standing.get(runId);
			if (guess) guesses.set(runId, guess);
		}
		const db = await getDb();
		const unknown = [...first.values()].filter((p) => !guesses.has(p.runId));
		const reads = unknown.length
			? await readForEvents(
					db,
					unknown.map((p) => ({ runId: p.runId, key: p.event.idempotencyKey }))
				)
			: new Map<string, EventRead>();
		for (const p of first.values()) {
			const guess = guesses.get(p.runId);
			const read = guess ?? reads.get(p.runId);
			try {
				if (!read) throw new RunRuleError(404, 'not-found', 'No run with this id.');
				if (read.seen) p.resolve(read.seen);
				else {
					const plan = await planEvent(db, read, p.event, p.actor);
					if (plan.done) alone.push(p);
					else planned.push({ pending: p, plan, guessed: !!guess });
				}
			} catch (e) {
				// A refusal from a guess may be wrong (a repeated key, a run changed elsewhere): ask the database.
				if (guess && e instanceof RunRuleError) {
					standing.delete(p.runId);
					alone.push(p);
				} else p.reject(e);
			}
		}
		const landed = planned.length
			? await writeSteps(
					db,
					planned.map((x) => x.plan.write)
				).catch((e) => {
					if (isUniqueViolation(e)) return new Map<string, Landed>();
					throw e;
				})
			: new Map<string, Landed>();
		for (const { pending, plan } of planned) {
			const step = landed.get(pending.runId);
			if (!step) {
				standing.delete(pending.runId);
				alone.push(pending);
				continue;
			}
			remember(pending.runId, { run: plan.next, seen: null, seq: plan.result.seq + 1, last: step.last });
			pending.resolve(plan.result);
		}
	} catch (e) {
		// The database failed: every event of the group gets the error (a settled one keeps its answer).
		for (const p of group) {
			standing.delete(p.runId);
			p.reject(e);
		}
		return;
	} finally {
		for (const runId of first.keys()) inFlight.delete(runId);
	}
	for (const p of alone) decideLocked(p.runId, p.event, p.actor).then(p.resolve, p.reject);
}

/** One event, decided under the run's row lock (see recordEvent). */
async function decideLocked(runId: string, event: RunEventInput, actor: Actor): Promise<RunEventResult> {
	const db = await getDb();
	standing.delete(runId);
	try {
		return await db.transaction(async (tx) => {
			await lockRun(tx, runId);
			const read = await readForEvent(tx, runId, event.idempotencyKey);
			if (read.seen) return read.seen;
			const plan = await planEvent(tx, read, event, actor);
			if (!(await writeSteps(tx, [plan.write])).has(runId))
				throw new Error(`run ${runId} changed while its row was locked`);
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
	} finally {
		standing.delete(runId);
	}
}

/** Stops a run that is under way; the reason is kept with it. */
export async function abandon(runId: string, reason: string, actor: Actor): Promise<Run> {
	const db = await getDb();
	standing.delete(runId);
	try {
		return await db.transaction(async (tx) => {
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
	} finally {
		standing.delete(runId);
	}
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
