/**
 * The server's side of "data first" (src/lib/domain/data-first.ts): an event that would answer at,
 * or move into, a step that puts the data at risk is held while the job is data-first, the data is
 * known to be reachable (this run's path proves it, or another run of the job recorded it) and no
 * data outcome is on record. The pure test comes first, and jobs whose gate is open for good are
 * remembered, so the database is read only for an event that could be held on a data-first job
 * with nothing recorded; that job is read fresh every time (never from a remembered run), so an
 * outcome recorded a moment ago always counts.
 */
import { and, eq, ne } from 'drizzle-orm';
import type { DB, Tx } from '$lib/server/db';
import { jobs } from '$lib/server/db/schema/jobs';
import { runs } from '$lib/server/db/schema/runs';
import { dataGateMessage, dataGateStep, type DataMove } from '$lib/domain/data-first';
import type { FlowDefinition } from '$lib/flows/schema';

/** Whether another run of the job has recorded the data reachable (the run screen asks it too). */
export async function reachedInOtherRun(db: DB | Tx, run: { id: string; jobId: string }): Promise<boolean> {
	const [other] = await db
		.select({ id: runs.id })
		.from(runs)
		.where(and(eq(runs.jobId, run.jobId), ne(runs.id, run.id), eq(runs.dataReachable, true)))
		.limit(1);
	return !!other;
}

/**
 * Jobs whose gate can never close again: not data-first (the flag is set at intake and never
 * changes) or with an outcome on record (an outcome is replaced, never removed). Kept so that a
 * risky step on such a job costs no read; safe with several processes for the same reason.
 */
const open = new Set<string>();
const OPEN_MAX = 5000;

/** Forgets the remembered jobs (caches.ts). */
export function forgetOpenJobs() {
	open.clear();
}

/** Remembers a job read elsewhere (a run's start locks it) whose gate is open for good. */
export function noteJob(job: { id: string; dataFirst: boolean; dataOutcome: string | null }) {
	if (job.dataFirst && !job.dataOutcome) return;
	open.add(job.id);
	if (open.size > OPEN_MAX) open.delete(open.values().next().value as string);
}

/** The refusal's sentence, or null when the event may go ahead. */
export async function dataSecureRefusal(
	db: DB | Tx,
	run: { id: string; jobId: string },
	definition: FlowDefinition,
	move: DataMove
): Promise<string | null> {
	// As if the job were data-first, the data reachable and nothing recorded: nothing to hold, no read.
	if (!dataGateStep(definition, { ...move, reachable: true }, { dataFirst: true, dataOutcome: null }))
		return null;
	if (open.has(run.jobId)) return null;
	const [job] = await db
		.select({ dataFirst: jobs.dataFirst, dataOutcome: jobs.dataOutcome })
		.from(jobs)
		.where(eq(jobs.id, run.jobId));
	if (!job) return null;
	if (!job.dataFirst || job.dataOutcome) {
		noteJob({ id: run.jobId, ...job });
		return null;
	}
	const reachable = move.reachable === true || (await reachedInOtherRun(db, run));
	const held = dataGateStep(definition, { ...move, reachable }, job);
	return held ? dataGateMessage(held.title) : null;
}
