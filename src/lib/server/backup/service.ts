/**
 * Backups taken by the running app (its scheduler, the lead's button, `npm run backup` through
 * POST /api/backups): the app's own database handle and blob store, so the embedded database is
 * copied by the process that holds its folder. One backup at a time in a process.
 */
import fs from 'node:fs/promises';
import path from 'node:path';
import type { PGlite } from '@electric-sql/pglite';
import { dataDir, getHandle } from '$lib/server/db';
import { env } from '$lib/server/env';
import { getStore, LocalStore, type BlobStore } from '$lib/server/storage';
import * as settings from '$lib/server/settings/queries';
import { BackupRefused } from './archive';
import { backupNamePattern, writeBackup, type BackupResult, type DbSource } from './create';
import { recordAttempt } from './queries';

export class BackupBusy extends Error {}

// One-process state: the backup being written, so a second request waits its turn instead of
// copying the database twice at once (several processes on PostgreSQL: see schedule.ts).
const g = globalThis as unknown as { __tidemarkBackup?: Promise<unknown> | null };

export function backupsDir() {
	const dir = dataDir();
	if (dir.startsWith('memory://'))
		throw new BackupRefused('DATA_DIR is memory:// (tests): there is no data folder to keep backups in.');
	return path.resolve(dir, 'backups');
}

export function describeStore(store: BlobStore) {
	return store instanceof LocalStore
		? `storage interface, local folder ${store.root}`
		: `storage interface (${store.constructor.name})`;
}

export async function dbSource(): Promise<DbSource> {
	const handle = await getHandle();
	if (handle.kind === 'postgres') return { kind: 'postgres', url: env().DATABASE_URL! };
	return { kind: 'pglite', client: (handle.db as unknown as { $client: PGlite }).$client };
}

/** Deletes all but the newest `keep` backup files the app named; other files in the folder are left alone. */
export async function prune(dir: string, keep: number) {
	// By time, then by the -2, -3 … a second backup within the same second gets.
	const order = (n: string) => {
		const [, stamp, extra] = /(\d{8}T\d{6}Z)(?:-(\d+))?/.exec(n)!;
		return `${stamp}.${(extra ?? '1').padStart(6, '0')}`;
	};
	const names = (await fs.readdir(dir).catch(() => [] as string[]))
		.filter((n) => backupNamePattern.test(n))
		.sort((a, b) => order(a).localeCompare(order(b)));
	const gone = names.slice(0, Math.max(0, names.length - keep));
	for (const n of gone) await fs.rm(path.join(dir, n), { force: true });
	return gone;
}

export async function backupNow(
	trigger: 'schedule' | 'command' | 'lead',
	opts: { outDir?: string } = {}
): Promise<BackupResult & { pruned: string[] }> {
	if (g.__tidemarkBackup)
		throw new BackupBusy('A backup is being written right now; try again when it has finished.');
	const outDir = opts.outDir ?? backupsDir();
	const startedAt = new Date();
	const job = (async () => {
		const store = getStore();
		try {
			const result = await writeBackup({
				source: await dbSource(),
				store,
				storeLabel: describeStore(store),
				outDir
			});
			await recordAttempt({
				trigger,
				status: 'succeeded',
				startedAt,
				file: path.basename(result.file),
				bytes: result.bytes,
				method: result.manifest.database.method,
				photos: result.manifest.photos.count,
				error: result.manifest.photos.missing.length
					? `${result.manifest.photos.missing.length} photos named by the database were not in the store`
					: null
			});
			const { keep } = await settings.getBackups();
			return { ...result, pruned: await prune(outDir, keep) };
		} catch (e) {
			await recordAttempt({
				trigger,
				status: 'failed',
				startedAt,
				file: null,
				bytes: null,
				method: null,
				photos: null,
				error: (e as Error).message.slice(0, 1000)
			}).catch(() => {});
			throw e;
		}
	})();
	g.__tidemarkBackup = job;
	try {
		return await job;
	} finally {
		g.__tidemarkBackup = null;
	}
}
