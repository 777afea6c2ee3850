/**
 * The app's own backups: a timer checks every 15 minutes whether the newest successful backup is
 * older than the shop's interval (Settings → Backups, daily by default) and, if so, writes one into
 * DATA_DIR/backups and keeps the newest N. After a failure it waits an hour before trying again.
 * On PostgreSQL several processes may run the timer; a session advisory lock lets one of them back
 * up at a time, and each re-reads the newest attempt once it holds the lock.
 */
import { dataDir, unlessRunningElsewhere } from '$lib/server/db';
import { env } from '$lib/server/env';
import * as settings from '$lib/server/settings/queries';
import { backupConfig } from './config';
import { lastSuccess, recent } from './queries';
import { backupNow } from './service';

const CHECK_MS = 15 * 60_000;
const FIRST_CHECK_MS = 60_000;
const RETRY_AFTER_FAILURE_MS = 3_600_000;

export async function due(now: Date): Promise<boolean> {
	const { everyHours } = await settings.getBackups();
	const ok = await lastSuccess();
	if (ok && now.getTime() - ok.finishedAt.getTime() < everyHours * 3_600_000) return false;
	const [newest] = await recent(1);
	if (newest?.status === 'failed' && now.getTime() - newest.finishedAt.getTime() < RETRY_AFTER_FAILURE_MS)
		return false;
	return true;
}

/** One check: a backup when one is due (and this process wins the lock), else null. */
export async function tick(now = new Date()) {
	if (!(await due(now))) return null;
	const r = await unlessRunningElsewhere('backups', async () =>
		(await due(new Date())) ? backupNow('schedule') : null
	);
	return r.ran ? r.value : null;
}

// One-process state: this process's timers (each process on PostgreSQL has its own; the lock above
// keeps their backups from overlapping).
const g = globalThis as unknown as { __tidemarkBackupTimers?: NodeJS.Timeout[] };

async function check() {
	try {
		const r = await tick();
		if (r) console.log(`[backup] wrote ${r.file} (${(r.bytes / 1e6).toFixed(1)} MB, ${r.ms} ms)`);
	} catch (e) {
		console.error('[backup] scheduled backup failed:', (e as Error).message);
	}
}

export function startBackups() {
	if (dataDir().startsWith('memory://') && !env().DATABASE_URL) return false;
	if (backupConfig().BACKUP_SCHEDULE === 'off') {
		console.log('[backup] BACKUP_SCHEDULE=off: no scheduled backups (npm run backup still works).');
		return false;
	}
	for (const t of g.__tidemarkBackupTimers ?? []) clearTimeout(t);
	const first = setTimeout(check, FIRST_CHECK_MS);
	const every = setInterval(check, CHECK_MS);
	first.unref();
	every.unref();
	g.__tidemarkBackupTimers = [first, every];
	return true;
}

/** Stops the timers and waits for a backup under way, so the database is not closed beneath it. */
export async function stopBackups() {
	for (const t of g.__tidemarkBackupTimers ?? []) clearTimeout(t);
	g.__tidemarkBackupTimers = [];
	const running = (globalThis as unknown as { __tidemarkBackup?: Promise<unknown> | null }).__tidemarkBackup;
	if (running) await running.catch(() => {});
}
