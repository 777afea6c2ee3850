import { sql } from 'drizzle-orm';
import { check, jsonb, pgTable, text, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
// Relative imports: drizzle-kit reads this file outside Vite, where $lib does not resolve.
import { timestamptz } from './columns';
import { users } from './users';
import { jobs } from './jobs';
import { runs } from './runs';

/** One ticked/answered item of a checklist. `result` is null while the item is still open. */
export type ChecklistItem = {
	key: string;
	label: string;
	result: 'done' | 'pass' | 'fail' | 'not-tested' | null;
	note: string;
};

/**
 * The repair checklist and the function test of a completed run: one row per run and kind, the
 * items as jsonb so a save is a single upsert (and its audit record) in one transaction.
 */
export const checklistResults = pgTable(
	'checklist_results',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		jobId: uuid('job_id')
			.notNull()
			.references(() => jobs.id, { onDelete: 'cascade' }),
		runId: uuid('run_id')
			.notNull()
			.references(() => runs.id, { onDelete: 'cascade' }),
		kind: text('kind', { enum: ['repair', 'function-test'] }).notNull(),
		items: jsonb('items').$type<ChecklistItem[]>().notNull(),
		by: uuid('by').references(() => users.id),
		at: timestamptz('at').notNull().defaultNow()
	},
	(t) => [
		uniqueIndex('checklist_results_run_kind_idx').on(t.runId, t.kind),
		check('checklist_results_kind_check', sql`${t.kind} in ('repair', 'function-test')`)
	]
);

export type ChecklistResult = typeof checklistResults.$inferSelect;
