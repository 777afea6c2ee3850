/**
 * The ready gate: a repaired phone goes back to its owner only when every after-repair function
 * test item is answered, and every "not tested" one says why. jobs.transition asks it before any
 * move from testing to ready. Kept apart from checklists/queries (which imports the jobs module)
 * so the jobs module can import it without a cycle.
 */
import { and, desc, eq } from 'drizzle-orm';
import type { getDb, Tx } from '$lib/server/db';
import { runs } from '$lib/server/db/schema/runs';
import { checklistResults } from '$lib/server/db/schema/checklists';
import { capabilitiesOf } from '$lib/server/jobs/device-models';
import { functionTestsFor } from '$lib/domain/functionTests';

type Db = Tx | Awaited<ReturnType<typeof getDb>>;

/**
 * Labels of the after-repair items that are unanswered, or "not tested" without a reason.
 * Null when the job has no completed run: there is no after-repair test to hold it to.
 */
export async function untestedWithoutReason(
	db: Db,
	job: { id: string; maker: string; model: string }
): Promise<string[] | null> {
	const [run] = await db
		.select({ id: runs.id })
		.from(runs)
		.where(and(eq(runs.jobId, job.id), eq(runs.status, 'completed')))
		.orderBy(desc(runs.finishedAt))
		.limit(1);
	if (!run) return null;
	const [saved] = await db
		.select({ items: checklistResults.items })
		.from(checklistResults)
		.where(and(eq(checklistResults.runId, run.id), eq(checklistResults.kind, 'function-test')));
	const byKey = new Map((saved?.items ?? []).map((i) => [i.key, i]));
	const defs = functionTestsFor(await capabilitiesOf(job.maker, job.model, db), 'after');
	return defs
		.filter((d) => {
			const item = byKey.get(d.key);
			return !item?.result || (item.result === 'not-tested' && !item.note.trim());
		})
		.map((d) => d.label);
}

export function gateMessage(labels: string[]): string {
	return (
		`The job cannot be ready to collect: ${labels.length === 1 ? 'this item is' : 'these items are'} ` +
		`not tested and ${labels.length === 1 ? 'has' : 'have'} no reason: ${labels.join(', ')}. ` +
		'Test them, or give a reason for each on the checklists page.'
	);
}
