import { sql } from 'drizzle-orm';
import { bigint, check, index, integer, pgTable, text, uuid } from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';

export const backupTriggers = ['schedule', 'command', 'lead'] as const;
export const backupStatuses = ['succeeded', 'failed'] as const;

/**
 * One backup attempt, written when it ends (so a backup never holds a row about itself that says
 * "running"). The lead's Today reads the newest: a failure, or no success for two days, shows there.
 */
export const backupRuns = pgTable(
	'backup_runs',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		trigger: text('trigger', { enum: backupTriggers }).notNull(),
		status: text('status', { enum: backupStatuses }).notNull(),
		startedAt: timestamptz('started_at').notNull(),
		finishedAt: timestamptz('finished_at').notNull().defaultNow(),
		/** The backup file's name (in DATA_DIR/backups, or where the command wrote it). */
		file: text('file'),
		bytes: bigint('bytes', { mode: 'number' }),
		/** How the database was copied: 'pglite-datadir' or 'pg_dump-custom'. */
		method: text('method'),
		photos: integer('photos'),
		error: text('error')
	},
	(t) => [
		index('backup_runs_finished_idx').on(t.finishedAt),
		check('backup_runs_trigger_check', sql`${t.trigger} in ('schedule', 'command', 'lead')`),
		check('backup_runs_status_check', sql`${t.status} in ('succeeded', 'failed')`)
	]
);

export type BackupRun = typeof backupRuns.$inferSelect;
