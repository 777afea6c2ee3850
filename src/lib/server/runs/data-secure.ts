/**
 * The server's side of "data first" (src/lib/domain/data-first.ts): an event that would answer at,
 * or move into, a step that puts the data at risk is held while the job is data-first, the run's
 * path proves the data reachable and no data outcome is on record. The pure test comes first, so
 * the job is read only for the rare event that could be held; it is read fresh every time (never
 * from a remembered run), so an outcome recorded a moment ago always counts.
 */
import { eq } from 'drizzle-orm';
import type { DB, Tx } from '$lib/server/db';
import { jobs } from '$lib/server/db/schema/jobs';
import { dataGateMessage, dataGateStep, type DataMove } from '$lib/domain/data-first';
import type { FlowDefinition } from '$lib/flows/schema';

/** The refusal's sentence, or null when the event may go ahead. */
export async function dataSecureRefusal(
	db: DB | Tx,
	jobId: string,
	definition: FlowDefinition,
	move: DataMove
): Promise<string | null> {
	// As if the job were data-first with nothing recorded: nothing to hold means no read.
	if (!dataGateStep(definition, move, { dataFirst: true, dataOutcome: null })) return null;
	const [job] = await db
		.select({ dataFirst: jobs.dataFirst, dataOutcome: jobs.dataOutcome })
		.from(jobs)
		.where(eq(jobs.id, jobId));
	if (!job) return null;
	const held = dataGateStep(definition, move, job);
	return held ? dataGateMessage(held.title) : null;
}
