import { sql } from 'drizzle-orm';
import { bigserial, boolean, check, index, integer, pgTable, text, uuid } from 'drizzle-orm/pg-core';
// Relative imports: drizzle-kit reads this file outside Vite, where $lib does not resolve.
import { timestamptz } from './columns';
import { users } from './users';
import { runs } from './runs';

/**
 * Did the repair confirm the run's verdict? Written by the repair checklist; the newest row of a
 * run counts. `confirmed = false` means the verdict was overturned, and the note says why.
 */
export const verdictConfirmations = pgTable(
	'verdict_confirmations',
	{
		id: bigserial('id', { mode: 'number' }).primaryKey(),
		runId: uuid('run_id')
			.notNull()
			.references(() => runs.id, { onDelete: 'cascade' }),
		confirmed: boolean('confirmed').notNull(),
		note: text('note').notNull().default(''),
		by: uuid('by').references(() => users.id),
		at: timestamptz('at').notNull().defaultNow()
	},
	(t) => [index('verdict_confirmations_run_idx').on(t.runId, t.at)]
);

/**
 * One row per finished (completed or abandoned) run: everything the insights need, flattened, so
 * the dashboard never joins runs, jobs and run_steps on the request path. Written in the same
 * transaction that finishes the run (insights/facts.ts recordRunFinished) and rebuilt from the
 * source tables by rebuildFacts. `seq` moves forward on every write so readers can pick up changes
 * incrementally (see insights/store.ts).
 */
export const insightRunFacts = pgTable(
	'insight_run_facts',
	{
		runId: uuid('run_id')
			.primaryKey()
			.references(() => runs.id, { onDelete: 'cascade' }),
		seq: bigserial('seq', { mode: 'number' }).notNull(),
		jobId: uuid('job_id').notNull(),
		flowId: text('flow_id').notNull(),
		version: integer('version').notNull(),
		status: text('status', { enum: ['completed', 'abandoned'] }).notNull(),
		verdictCode: text('verdict_code'),
		/** Maker and model as typed at intake, e.g. "Corvana Tern 5". */
		deviceModel: text('device_model').notNull(),
		technicianId: uuid('technician_id').notNull(),
		startedAt: timestamptz('started_at').notNull(),
		finishedAt: timestamptz('finished_at').notNull(),
		/** Start to verdict (or to abandonment), whole seconds. */
		durationS: integer('duration_s').notNull(),
		/** The answered path, revised answers left out: step ids, chosen outcome/range index, seconds on each. */
		stepIds: text('step_ids').array().notNull(),
		outcomes: integer('outcomes').array().notNull(),
		dwellS: integer('dwell_s').array().notNull(),
		abandonReason: text('abandon_reason'),
		/** The step the run stood on when it was abandoned. */
		abandonStep: text('abandon_step'),
		/** Newest verdict confirmation: true confirmed, false overturned, null not judged yet. */
		confirmed: boolean('confirmed'),
		confirmationNote: text('confirmation_note'),
		confirmedAt: timestamptz('confirmed_at')
	},
	(t) => [
		index('insight_run_facts_seq_idx').on(t.seq),
		index('insight_run_facts_finished_idx').on(t.finishedAt),
		check('insight_run_facts_status_check', sql`${t.status} in ('completed', 'abandoned')`)
	]
);

export type VerdictConfirmation = typeof verdictConfirmations.$inferSelect;
export type InsightRunFact = typeof insightRunFacts.$inferSelect;
