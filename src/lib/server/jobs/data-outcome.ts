/**
 * What became of the customer's data on a job: backed up, the customer declined, or not possible,
 * with a note, who and when. Recorded on the job (a later word replaces an earlier one) and
 * audited; the data-first gate of runs (src/lib/server/runs/data-secure.ts) opens once it is there.
 */
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { jobs, type Job } from '$lib/server/db/schema/jobs';
import { record } from '$lib/server/audit';
import type { DataOutcomeInput } from '$lib/schemas/data-outcome';
import { lockJob } from './queries';

export async function recordDataOutcome(
	jobId: string,
	input: DataOutcomeInput,
	actorId: string
): Promise<Job> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const job = await lockJob(tx, jobId);
		const note = input.note.trim();
		// The same word again (a retried request, a second tablet) changes nothing.
		if (job.dataOutcome === input.outcome && job.dataNote === note) return job;
		const now = new Date();
		const [updated] = await tx
			.update(jobs)
			.set({
				dataOutcome: input.outcome,
				dataNote: note,
				dataRecordedBy: actorId,
				dataRecordedAt: now,
				updatedAt: now
			})
			.where(eq(jobs.id, jobId))
			.returning();
		await record(tx, {
			actorId,
			action: 'job.data-outcome',
			targetType: 'job',
			targetId: jobId,
			details: {
				outcome: input.outcome,
				note,
				...(input.runId ? { runId: input.runId } : {}),
				...(job.dataOutcome ? { previous: job.dataOutcome, previousNote: job.dataNote } : {})
			}
		});
		return updated;
	});
}
