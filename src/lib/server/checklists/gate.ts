/**
 * The ready gate: a repaired phone goes back to its owner only when every after-repair function
 * test item is answered, and every "not tested" one says why. A job with no after-repair test at
 * all (no completed run, or a newer verdict not yet tested) needs a reason on the move itself.
 * jobs.transition asks it before any move from testing to ready (awaiting-approval → ready is a
 * phone going back unrepaired, with nothing to test). Kept apart from checklists/queries (which
 * imports the jobs module) so the jobs module can import it without a cycle.
 */
import { and, desc, eq } from 'drizzle-orm';
import type { getDb, Tx } from '$lib/server/db';
import { runs } from '$lib/server/db/schema/runs';
import { checklistResults, type ChecklistItem } from '$lib/server/db/schema/checklists';
import { capabilitiesOf } from '$lib/server/jobs/device-models';
import { functionTestsFor } from '$lib/domain/functionTests';

type Db = Tx | Awaited<ReturnType<typeof getDb>>;

/** The saved after-repair items of the job's newest completed run; null when there is none. */
async function afterRepairTest(db: Db, jobId: string): Promise<ChecklistItem[] | null> {
	const [run] = await db
		.select({ id: runs.id })
		.from(runs)
		.where(and(eq(runs.jobId, jobId), eq(runs.status, 'completed')))
		.orderBy(desc(runs.finishedAt))
		.limit(1);
	if (!run) return null;
	const [saved] = await db
		.select({ items: checklistResults.items })
		.from(checklistResults)
		.where(and(eq(checklistResults.runId, run.id), eq(checklistResults.kind, 'function-test')));
	return saved?.items ?? null;
}

/**
 * Labels of the after-repair items that are unanswered, or "not tested" without a reason.
 * Null when the job has no after-repair test recorded (see readyGate for that case).
 */
export async function untestedWithoutReason(
	db: Db,
	job: { id: string; maker: string; model: string }
): Promise<string[] | null> {
	const saved = await afterRepairTest(db, job.id);
	if (!saved) return null;
	const byKey = new Map(saved.map((i) => [i.key, i]));
	const defs = functionTestsFor(await capabilitiesOf(job.maker, job.model, db), 'after');
	return defs
		.filter((d) => {
			const item = byKey.get(d.key);
			return !item?.result || (item.result === 'not-tested' && !item.note.trim());
		})
		.map((d) => d.label);
}

/**
 * Why the job may not be ready to collect, or null when it may. `reason` is the note given with
 * the move: it stands in for a test only when there is no after-repair test at all.
 */
export async function readyGate(
	db: Db,
	job: { id: string; maker: string; model: string },
	reason: string
): Promise<string | null> {
	const missing = await untestedWithoutReason(db, job);
	if (missing === null) return reason.trim() ? null : NO_TEST_MESSAGE;
	return missing.length ? gateMessage(missing) : null;
}

export const NO_TEST_MESSAGE =
	'The job cannot be ready to collect: no after-repair function test is recorded. ' +
	'Record it on the checklists page, or give the reason it was not done in the note.';

export function gateMessage(labels: string[]): string {
	return (
		`The job cannot be ready to collect: ${labels.length === 1 ? 'this item is' : 'these items are'} ` +
		`not tested and ${labels.length === 1 ? 'has' : 'have'} no reason: ${labels.join(', ')}. ` +
		'Test them, or give a reason for each on the checklists page.'
	);
}
