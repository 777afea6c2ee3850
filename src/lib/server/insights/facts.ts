/**
 * Keeps `insight_run_facts` (one flat row per finished run) in step with runs, jobs, run_steps and
 * verdict_confirmations. The row is written in the same transaction that finishes the run, so the
 * insights never see a finished run without its facts, and the dashboard never has to join the
 * big tables on the request path (see docs: PGlite answers on the main thread).
 */
import { and, desc, eq, gt, sql, type SQL } from 'drizzle-orm';
import type { DB, Tx } from '$lib/server/db';
import { runs } from '$lib/server/db/schema/runs';
import { verdictConfirmations, type VerdictConfirmation } from '$lib/server/db/schema/insights';

/**
 * One statement computes and upserts the facts of every finished run `where` selects. Written as
 * SQL (not a read then a write) so the same code serves one run at completion and thousands in a
 * rebuild. The path keeps the answers that still count: BACK rows and revised answers are left out.
 */
function upsertFacts(where: SQL) {
	return sql`
		insert into insight_run_facts (run_id, job_id, flow_id, version, status, verdict_code, device_model,
			technician_id, started_at, finished_at, duration_s, step_ids, outcomes, dwell_s, abandon_reason,
			abandon_step, confirmed, confirmation_note, confirmed_at)
		select r.id, r.job_id, fv.flow_id, coalesce(fv.version, 0), r.status, r.verdict_code,
			trim(j.maker || ' ' || j.model), r.technician_id, r.started_at, r.finished_at,
			greatest(0, round(extract(epoch from r.finished_at - r.started_at)))::int,
			coalesce(p.step_ids, '{}'), coalesce(p.outcomes, '{}'), coalesce(p.dwell_s, '{}'),
			r.abandon_reason, case when r.status = 'abandoned' then r.current_step end,
			c.confirmed, c.note, c.at
		from runs r
		join jobs j on j.id = r.job_id
		join flow_versions fv on fv.id = r.flow_version_id
		left join lateral (
			select array_agg(s.step_id order by s.seq) as step_ids,
				array_agg(coalesce((s.answer->'outcome'->>'index')::int, (s.answer->'range'->>'index')::int, -1)
					order by s.seq) as outcomes,
				array_agg(greatest(0, round(extract(epoch from s.answered_at - s.entered_at)))::int
					order by s.seq) as dwell_s
			from run_steps s
			where s.run_id = r.id and s.kind <> 'back' and s.superseded_at is null
		) p on true
		left join lateral (
			select vc.confirmed, vc.note, vc.at from verdict_confirmations vc
			where vc.run_id = r.id order by vc.at desc, vc.id desc limit 1
		) c on true
		where r.status in ('completed', 'abandoned') and r.finished_at is not null and (${where})
		on conflict (run_id) do update set
			seq = nextval(pg_get_serial_sequence('insight_run_facts', 'seq')),
			job_id = excluded.job_id, flow_id = excluded.flow_id, version = excluded.version,
			status = excluded.status, verdict_code = excluded.verdict_code,
			device_model = excluded.device_model, technician_id = excluded.technician_id,
			started_at = excluded.started_at, finished_at = excluded.finished_at,
			duration_s = excluded.duration_s, step_ids = excluded.step_ids, outcomes = excluded.outcomes,
			dwell_s = excluded.dwell_s, abandon_reason = excluded.abandon_reason,
			abandon_step = excluded.abandon_step, confirmed = excluded.confirmed,
			confirmation_note = excluded.confirmation_note, confirmed_at = excluded.confirmed_at`;
}

/**
 * Call inside the transaction that completes or abandons a run (and after any later change to a
 * finished run). Idempotent: a second call rewrites the same row with a newer `seq`. A run that
 * is still in progress writes nothing.
 */
export async function recordRunFinished(tx: DB | Tx, runId: string): Promise<void> {
	await inSeqOrder(tx, upsertFacts(sql`r.id = ${runId}`));
}

/**
 * Readers catch up by `seq` (store.ts), so rows must become visible in `seq` order. On a server
 * several transactions (of one process's pool or of several processes) could draw 10 and 11 and
 * commit 11 first: a reader between the two would move past 10 for good. So the draw waits for
 * the previous writer's commit (a transaction-scoped advisory lock, held only from the facts write
 * to the commit: a run's last moments). On the embedded database transactions run one at a time.
 */
async function inSeqOrder(tx: DB | Tx, write: SQL) {
	const run = async (t: DB | Tx) => {
		await t.execute(sql`select pg_advisory_xact_lock(hashtextextended('tidemark:insight-facts-seq', 0))`);
		await t.execute(write);
	};
	if ('rollback' in tx) await run(tx);
	else await tx.transaction(run);
}

/** The same for many runs at once (the demo history writes its runs in batches). */
export async function recordRunsFinished(tx: DB | Tx, runIds: readonly string[]): Promise<void> {
	if (runIds.length === 0) return;
	const list = sql.join(
		runIds.map((id) => sql`${id}::uuid`),
		sql`, `
	);
	await inSeqOrder(tx, upsertFacts(sql`r.id in (${list})`));
}

/**
 * The repair's word on a verdict: records it and refreshes the run's facts in one transaction.
 * For the repair checklist; a later row for the same run replaces the earlier judgement.
 */
export async function recordConfirmation(
	db: DB,
	input: { runId: string; confirmed: boolean; note?: string; by: string | null; at?: Date }
): Promise<VerdictConfirmation> {
	return db.transaction(async (tx) => {
		const [row] = await tx
			.insert(verdictConfirmations)
			.values({
				runId: input.runId,
				confirmed: input.confirmed,
				note: input.note?.trim() ?? '',
				by: input.by,
				...(input.at ? { at: input.at } : {})
			})
			.returning();
		await recordRunFinished(tx, input.runId);
		return row;
	});
}

/** The newest confirmation of a run, or undefined. */
export async function confirmationOf(db: DB | Tx, runId: string) {
	const [row] = await db
		.select()
		.from(verdictConfirmations)
		.where(eq(verdictConfirmations.runId, runId))
		.orderBy(desc(verdictConfirmations.at), desc(verdictConfirmations.id))
		.limit(1);
	return row;
}

/**
 * Recomputes every fact from the source tables, in batches of finished runs (keyset on the run id)
 * so no single statement holds the database for long. Rows of runs that no longer exist go with
 * them (foreign key cascade). Returns the number of runs written.
 */
export async function rebuildFacts(
	db: DB,
	{ batch = 500, onProgress }: { batch?: number; onProgress?: (done: number) => void } = {}
): Promise<number> {
	let done = 0;
	let after = '00000000-0000-0000-0000-000000000000';
	for (;;) {
		const ids = await db
			.select({ id: runs.id })
			.from(runs)
			.where(and(gt(runs.id, after), sql`${runs.status} <> 'in-progress'`))
			.orderBy(runs.id)
			.limit(batch);
		if (ids.length === 0) break;
		const first = ids[0].id;
		after = ids[ids.length - 1].id;
		await inSeqOrder(db, upsertFacts(sql`r.id >= ${first} and r.id <= ${after}`));
		done += ids.length;
		onProgress?.(done);
		// Let waiting requests in between batches.
		await new Promise((r) => setImmediate(r));
	}
	return done;
}
