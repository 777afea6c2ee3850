/**
 * Which steps each run revised (went BACK to and answered again), held in this process and read
 * incrementally, beside the insights' copy of the facts (which keep only the answers that still
 * stand). A BACK is an inserted `run_steps` row and never changes afterwards, so the ids already
 * read never need reading again: each catch-up asks for `max(id)` (an index lookup) and reads the
 * BACK rows in the new id range, a bounded span per statement with a pause between, so a long
 * catch-up never holds PGlite's main thread for long (see docs/decisions/0001-insights-facts-in-memory.md).
 * On a PostgreSQL server ids are drawn before commit, so a BACK may become visible after a higher id
 * was read: the BACKs among the last `lookback` ids are read again each time (adding one twice is a no-op).
 */
import { sql } from 'drizzle-orm';
import type { DB } from '$lib/server/db';

/**
 * Rows written before the new ones that are read with them to find the answers their BACKs revise
 * (at least this many, else as many as the new rows): a BACK revises the run's previous answer,
 * written moments earlier. A catch-up of a few new rows thus reads a few hundred, not thousands.
 */
const LOOKBACK = 200;
/** Row ids read per statement (about one in five is a BACK in a typical history). */
const SPAN = 2000;

type Row = { id: number | string; run_id: string; step_id: string | null };

export class RevisionStore {
	/** Run id → the steps whose answer that run revised. */
	readonly byRun = new Map<string, Set<string>>();
	lastId = 0;
	/**
	 * Bumped when a revision arrives for a run that is already finished (rare: a finished run takes
	 * no BACK, but its rows may be read after its facts). Revisions of runs still under way change
	 * no figure until the run finishes, which moves the facts' own generation.
	 */
	generation = 0;
	private syncing: Promise<void> | null = null;

	/** Smaller `span` and `lookback` in specs, to reach the look-up further back. */
	constructor(
		readonly span = SPAN,
		readonly lookback = LOOKBACK
	) {}

	/** Catches up with run_steps; concurrent callers share one catch-up. */
	sync(db: DB, isFinished: (runId: string) => boolean): Promise<void> {
		this.syncing ??= this.catchUp(db, isFinished).finally(() => (this.syncing = null));
		return this.syncing;
	}

	add(runId: string, stepId: string, finished: boolean) {
		let steps = this.byRun.get(runId);
		if (!steps) this.byRun.set(runId, (steps = new Set()));
		if (steps.has(stepId)) return;
		steps.add(stepId);
		if (finished) this.generation++;
	}

	private async catchUp(db: DB, isFinished: (runId: string) => boolean) {
		const top = rowsOf<{ max: string | number | null }>(
			await db.execute(sql`select max(id) as max from run_steps`)
		)[0]?.max;
		const max = top === null || top === undefined ? 0 : Number(top);
		while (this.lastId < max) {
			const from = this.lastId;
			const to = Math.min(max, from + this.span);
			// The revised answer is the row of the same run whose seq the BACK names, written shortly
			// before it: match within the new rows and those just before them (one range scan and a
			// hash join, not an index lookup per BACK), then look up the few that lie further back.
			const rows = rowsOf<Row>(
				await db.execute(sql`
					with w as materialized (
						select id, run_id, seq, step_id, kind, answer from run_steps
						where id > ${from - Math.max(this.lookback, to - from)} and id <= ${to}
					)
					select b.id, b.run_id, s.step_id
					from w b left join w s on s.run_id = b.run_id and s.seq = (b.answer->'back'->>'revised')::int
					where b.id > ${from - this.lookback} and b.kind = 'back'`)
			);
			const far = rows.filter((r) => r.step_id === null);
			if (far.length > 0) {
				const ids = sql.join(
					far.map((r) => sql`${r.id}::bigint`),
					sql`, `
				);
				const found = rowsOf<Row>(
					await db.execute(sql`
						select b.id, b.run_id, s.step_id from run_steps b
						join run_steps s on s.run_id = b.run_id and s.seq = (b.answer->'back'->>'revised')::int
						where b.id in (${ids})`)
				);
				const stepOf = new Map(found.map((r) => [String(r.id), r.step_id]));
				for (const r of far) r.step_id = stepOf.get(String(r.id)) ?? null;
			}
			for (const r of rows) if (r.step_id !== null) this.add(r.run_id, r.step_id, isFinished(r.run_id));
			this.lastId = to;
			// Let waiting requests (a technician's step) run between statements.
			if (this.lastId < max) await new Promise((resolve) => setImmediate(resolve));
		}
	}
}

/** PGlite answers `{ rows }`, node-postgres through drizzle the same; keep both shapes safe. */
function rowsOf<T>(result: unknown): T[] {
	return (Array.isArray(result) ? result : (result as { rows: T[] }).rows) as T[];
}

const g = globalThis as unknown as { __tidemarkRevisions?: RevisionStore };

/** One store per process, on globalThis so that Vite's HMR does not load it twice. */
export function revisionStore(): RevisionStore {
	g.__tidemarkRevisions ??= new RevisionStore();
	return g.__tidemarkRevisions;
}

/** Forgets the process's copy (tests that start over with another database). */
export function resetRevisions() {
	g.__tidemarkRevisions = undefined;
}
