import { desc, eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { backupRuns, type BackupRun } from '$lib/server/db/schema/backups';
import type { Query } from './facts';
import { backupConfig } from './config';

export type Attempt = Omit<BackupRun, 'id' | 'finishedAt'> & { finishedAt?: Date };

export async function recordAttempt(a: Attempt) {
	const db = await getDb();
	const [row] = await db.insert(backupRuns).values(a).returning();
	return row;
}

/**
 * The same row written with plain SQL, for the command run against a database it opened itself
 * (no migrations applied there: a folder at an older level has no table yet, and is left alone).
 */
export async function recordAttemptRaw(
	q: (sql: string, params: unknown[]) => Promise<unknown>,
	check: Query,
	a: Attempt
) {
	const [t] = await check(`select to_regclass('public.backup_runs') is not null as ok`);
	if (!t.ok) return false;
	await q(
		`insert into backup_runs (trigger, status, started_at, file, bytes, method, photos, error) values ($1, $2, $3, $4, $5, $6, $7, $8)`,
		[a.trigger, a.status, a.startedAt.toISOString(), a.file, a.bytes, a.method, a.photos, a.error]
	);
	return true;
}

export async function recent(limit = 5) {
	const db = await getDb();
	return db.select().from(backupRuns).orderBy(desc(backupRuns.finishedAt)).limit(limit);
}

export async function lastSuccess() {
	const db = await getDb();
	const [row] = await db
		.select()
		.from(backupRuns)
		.where(eq(backupRuns.status, 'succeeded'))
		.orderBy(desc(backupRuns.finishedAt))
		.limit(1);
	return row ?? null;
}

/** Two days: a daily backup that missed one day still shows nothing; two missed days do. */
export const STALE_AFTER_MS = 2 * 24 * 3_600_000;

export type BackupHealth =
	| { kind: 'failed'; at: Date; error: string; lastSuccessAt: Date | null }
	| { kind: 'stale'; lastSuccessAt: Date | null }
	| null;

/**
 * What the lead's Today says about backups: the newest attempt failed, or none succeeded for two
 * days. Before the schedule's first attempt (a minute after start) there is nothing to say yet;
 * with the schedule off, no backup at all is worth saying.
 */
export async function health(now: Date): Promise<BackupHealth> {
	const [newest] = await recent(1);
	if (!newest && backupConfig().BACKUP_SCHEDULE === 'on') return null;
	const ok = await lastSuccess();
	const lastSuccessAt = ok?.finishedAt ?? null;
	if (newest?.status === 'failed')
		return {
			kind: 'failed',
			at: newest.finishedAt,
			error: newest.error ?? 'no reason recorded',
			lastSuccessAt
		};
	if (!lastSuccessAt || now.getTime() - lastSuccessAt.getTime() > STALE_AFTER_MS)
		return { kind: 'stale', lastSuccessAt };
	return null;
}
