/**
 * Checklists after a verdict: the repair checklist, the function test and the technician's word on
 * whether the repair confirmed the verdict. They belong to the newest completed run of a job. Every
 * save is one transaction with its audit record, and the job's status follows (jobs.transition,
 * only moves the workflow allows):
 * - every repair item done → testing (from repairing);
 * - any function-test fail → diagnosing (from testing or repairing);
 * - every function test answered, none failed → ready (from testing), held back while an item
 *   is "not tested" without a reason (the ready gate, gate.ts).
 * The function-test items follow the job's device model (domain/functionTests.ts).
 */
import { RuleError } from '$lib/server/errors';
import { isUuid } from '$lib/schemas/ids';
import { and, desc, eq } from 'drizzle-orm';
import { getDb, type Tx } from '$lib/server/db';
import { runs } from '$lib/server/db/schema/runs';
import { flowVersions } from '$lib/server/db/schema/flows';
import { verdictConfirmations } from '$lib/server/db/schema/insights';
import { checklistResults, type ChecklistItem, type ChecklistResult } from '$lib/server/db/schema/checklists';
import { record } from '$lib/server/audit';
import * as jobs from '$lib/server/jobs/queries';
import { recordRunFinished, confirmationOf } from '$lib/server/insights/facts';
import { canTransition, type JobStatus } from '$lib/domain/jobStatus';
import type { FlowDefinition, VerdictStep } from '$lib/flows/schema';
import { FUNCTION_TESTS, repairItems, type ChecklistDef, type ChecklistKind } from './items';
import { functionTestsFor, type PreRepairTest } from '$lib/domain/functionTests';
import { capabilitiesOf } from '$lib/server/jobs/device-models';
import { gateMessage, untestedWithoutReason } from './gate';

export { FUNCTION_TESTS, repairItems };

type Db = Tx | Awaited<ReturnType<typeof getDb>>;

/** The after-repair items asked of this job's device. */
async function deviceTests(db: Db, job: { maker: string; model: string }) {
	return functionTestsFor(await capabilitiesOf(job.maker, job.model, db), 'after');
}

export type FunctionResult = 'pass' | 'fail' | 'not-tested';

export type ChecklistView = {
	jobId: string;
	jobStatus: JobStatus;
	run: { id: string; verdictCode: string; finishedAt: string | null };
	verdict: {
		title: string;
		severity: VerdictStep['verdict']['severity'];
		repair: string;
		risks: string;
		parts: string[];
		cautions: string[];
	};
	repair: ChecklistItem[];
	functionTest: ChecklistItem[];
	/** What worked when the phone came in, for the "before" beside each item; null if not recorded. */
	preRepair: PreRepairTest | null;
	confirmation: { confirmed: boolean; note: string; at: string } | null;
};

/** The newest completed run of the job with its verdict step, or undefined. */
async function verdictRun(db: Tx | Awaited<ReturnType<typeof getDb>>, jobId: string) {
	if (!isUuid(jobId)) return undefined;
	const [row] = await db
		.select({ run: runs, definition: flowVersions.definition })
		.from(runs)
		.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
		.where(and(eq(runs.jobId, jobId), eq(runs.status, 'completed')))
		.orderBy(desc(runs.finishedAt))
		.limit(1);
	if (!row || !row.run.verdictStep) return undefined;
	const step = (row.definition as FlowDefinition).steps[row.run.verdictStep];
	if (!step || step.kind !== 'verdict') return undefined;
	return { run: row.run, step };
}

/** Saved results laid over the checklist's items; items no longer in the list are dropped. */
function merge(defs: readonly ChecklistDef[], saved: ChecklistItem[] | undefined): ChecklistItem[] {
	const byKey = new Map((saved ?? []).map((i) => [i.key, i]));
	return defs.map((d) => ({
		key: d.key,
		label: d.label,
		result: byKey.get(d.key)?.result ?? null,
		note: byKey.get(d.key)?.note ?? ''
	}));
}

async function savedOf(db: Tx | Awaited<ReturnType<typeof getDb>>, runId: string) {
	const rows = await db.select().from(checklistResults).where(eq(checklistResults.runId, runId));
	const of = (kind: ChecklistKind): ChecklistResult | undefined => rows.find((r) => r.kind === kind);
	return { repair: of('repair')?.items, functionTest: of('function-test')?.items };
}

/** Everything the checklists page shows, or undefined when the job has no verdict yet. */
export async function forJob(jobId: string): Promise<ChecklistView | undefined> {
	const db = await getDb();
	const found = await verdictRun(db, jobId);
	const job = found && (await jobs.get(jobId));
	if (!found || !job) return undefined;
	const { run, step } = found;
	const saved = await savedOf(db, run.id);
	const confirmation = await confirmationOf(db, run.id);
	return {
		jobId,
		jobStatus: job.status,
		run: { id: run.id, verdictCode: run.verdictCode!, finishedAt: run.finishedAt?.toISOString() ?? null },
		verdict: {
			title: step.title,
			severity: step.verdict.severity,
			repair: step.verdict.repair,
			risks: step.verdict.risks,
			parts: step.verdict.parts ?? [],
			cautions: step.cautions ?? []
		},
		repair: merge(repairItems(step.verdict.repair), saved.repair),
		functionTest: merge(await deviceTests(db, job), saved.functionTest),
		preRepair: job.preRepairTest ?? null,
		confirmation: confirmation
			? { confirmed: confirmation.confirmed, note: confirmation.note, at: confirmation.at.toISOString() }
			: null
	};
}

/** Locks the job, finds its verdict run; refusals name what is missing. */
async function begin(tx: Tx, jobId: string) {
	const job = await jobs.lockJob(tx, jobId).catch(() => {
		throw new RuleError(404, 'not-found', 'No job with this id.');
	});
	const found = await verdictRun(tx, jobId);
	if (!found) throw new RuleError(400, 'no-verdict', 'This job has no run with a verdict yet.');
	return { job, ...found };
}

async function upsert(
	tx: Tx,
	jobId: string,
	runId: string,
	kind: ChecklistKind,
	items: ChecklistItem[],
	by: string | null
) {
	await tx
		.insert(checklistResults)
		.values({ jobId, runId, kind, items, by })
		.onConflictDoUpdate({
			target: [checklistResults.runId, checklistResults.kind],
			set: { items, by, at: new Date() }
		});
}

/** Moves the job if the workflow allows it from where it stands now; returns the move made. */
async function follow(
	tx: Tx,
	jobId: string,
	from: JobStatus,
	to: JobStatus,
	by: string | null,
	note: string
) {
	if (!canTransition(from, to)) return null;
	await jobs.transition(jobId, to, by, note, tx);
	return to;
}

/** `untested`: labels holding the job back from ready (not tested, no reason given). */
export type SaveResult = {
	moved: JobStatus | null;
	complete: boolean;
	untested?: string[];
	message?: string;
};

/** Ticks the repair checklist: `done` holds the keys of the ticked items. */
export async function saveRepair(
	jobId: string,
	done: readonly string[],
	by: string | null
): Promise<SaveResult> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const { job, run, step } = await begin(tx, jobId);
		const defs = repairItems(step.verdict.repair);
		const unknown = done.filter((k) => !defs.some((d) => d.key === k));
		if (unknown.length)
			throw new RuleError(400, 'invalid-input', 'The repair checklist has changed; reload the page.');
		const items: ChecklistItem[] = defs.map((d) => ({
			key: d.key,
			label: d.label,
			result: done.includes(d.key) ? 'done' : null,
			note: ''
		}));
		await upsert(tx, jobId, run.id, 'repair', items, by);
		const complete = items.every((i) => i.result === 'done');
		await record(tx, {
			actorId: by,
			action: 'checklist.repair',
			targetType: 'job',
			targetId: jobId,
			details: { runId: run.id, done: items.filter((i) => i.result).length, of: items.length }
		});
		const moved = complete
			? await follow(tx, jobId, job.status, 'testing', by, 'Repair checklist complete')
			: null;
		return { moved, complete };
	});
}

export type FunctionTestInput = Record<string, { result: FunctionResult | null; note: string }>;

/** Saves the function test; a fail reopens diagnosis, a full pass (no fail) makes the job ready. */
export async function saveFunctionTest(
	jobId: string,
	input: FunctionTestInput,
	by: string | null
): Promise<SaveResult> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const { job, run } = await begin(tx, jobId);
		const defs = await deviceTests(tx, job);
		const unknown = Object.keys(input).filter((k) => !defs.some((d) => d.key === k));
		if (unknown.length) throw new RuleError(400, 'invalid-input', `Unknown test: ${unknown.join(', ')}.`);
		const items: ChecklistItem[] = defs.map((d) => ({
			key: d.key,
			label: d.label,
			result: input[d.key]?.result ?? null,
			note: input[d.key]?.note?.trim() ?? ''
		}));
		await upsert(tx, jobId, run.id, 'function-test', items, by);
		const failed = items.filter((i) => i.result === 'fail');
		const complete = items.every((i) => i.result !== null);
		await record(tx, {
			actorId: by,
			action: 'checklist.function-test',
			targetType: 'job',
			targetId: jobId,
			details: { runId: run.id, failed: failed.map((i) => i.key), complete }
		});
		let moved: JobStatus | null = null;
		if (failed.length) {
			moved = await follow(
				tx,
				jobId,
				job.status,
				'diagnosing',
				by,
				`Function test failed: ${failed.map((i) => i.label).join(', ')}`
			);
		} else if (complete && canTransition(job.status, 'ready')) {
			const untested = (await untestedWithoutReason(tx, job)) ?? [];
			if (untested.length) return { moved, complete, untested, message: gateMessage(untested) };
			moved = await follow(tx, jobId, job.status, 'ready', by, 'Function test passed');
		}
		return { moved, complete };
	});
}

/**
 * Did the repair confirm the verdict? Stored in verdict_confirmations (the newest row counts) and
 * the run's insight facts refreshed in the same transaction, so the accuracy figure follows.
 */
export async function confirmVerdict(
	jobId: string,
	input: { confirmed: boolean; note: string },
	by: string | null
) {
	const note = input.note.trim();
	if (!input.confirmed && !note)
		throw new RuleError(400, 'invalid-input', 'Say what the repair found instead of the verdict.', {
			field: 'note'
		});
	const db = await getDb();
	return db.transaction(async (tx) => {
		const { run } = await begin(tx, jobId);
		const [row] = await tx
			.insert(verdictConfirmations)
			.values({ runId: run.id, confirmed: input.confirmed, note, by })
			.returning();
		// Insights read the newest confirmation from its facts row (insights/facts.ts).
		await recordRunFinished(tx, run.id);
		await record(tx, {
			actorId: by,
			action: 'verdict.confirm',
			targetType: 'run',
			targetId: run.id,
			details: { jobId, confirmed: input.confirmed, ...(note ? { note } : {}) }
		});
		return row;
	});
}
