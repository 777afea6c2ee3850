/**
 * What `npm run backup` and `npm run restore` do (scripts/backup.ts, scripts/restore.ts load this
 * through Vite). The backup command picks its way by what it finds:
 *   DATABASE_URL set         → pg_dump of the server (no app needed), photos from DATA_DIR's store;
 *   the app holds DATA_DIR   → asks the running app (POST /api/backups with BACKUP_TOKEN);
 *   otherwise                → opens the stopped app's data folder itself (locked while it reads).
 */
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import pg from 'pg';
import { dataDir } from '$lib/server/db';
import { lockDataDir, releaseLock } from '$lib/server/db/lock';
import { publicBaseUrl } from '$lib/server/public-url';
import { getStore } from '$lib/server/storage';
import { backupConfig } from './config';
import { writeBackup, type BackupResult, type DbSource } from './create';
import { methods, type Manifest } from './manifest';
import { recordAttemptRaw } from './queries';
import { restoreBackup } from './restore';
import { describeStore } from './service';

export { BackupRefused } from './archive';

type Say = (line: string) => void;

/** The pid of a live process holding the data folder's lock (db/lock.ts), or null. */
function holder(dir: string): number | null {
	let pid: number;
	try {
		pid = Number(fs.readFileSync(path.resolve(dir, 'pgdata.lock'), 'utf8'));
	} catch {
		return null;
	}
	if (!Number.isInteger(pid) || pid <= 0 || pid === process.pid) return null;
	try {
		process.kill(pid, 0);
		return pid;
	} catch (e) {
		return (e as NodeJS.ErrnoException).code === 'EPERM' ? pid : null;
	}
}

export function summary(m: Manifest, file: string, bytes: number) {
	const rows = Object.values(m.counts).reduce((a, b) => a + b, 0);
	return [
		`Wrote ${file} (${(bytes / 1e6).toFixed(2)} MB).`,
		`Database: ${methods[m.database.method].says} — ${m.database.tool}.`,
		`Migration level ${m.migrations.applied} (${m.migrations.latestTag ?? (m.migrations.applied ? 'unknown' : 'none')}); ${rows} rows in ${Object.keys(m.counts).length} tables; ${m.photos.count} photo files (${m.photos.source}).`,
		...(m.photos.missing.length
			? [`Warning: ${m.photos.missing.length} photo files named by the database were not in the store.`]
			: [])
	];
}

async function viaApp(
	pid: number,
	say: Say,
	out: string | undefined,
	url: string | undefined
): Promise<number> {
	const token = backupConfig().BACKUP_TOKEN;
	const base = (url || backupConfig().TIDEMARK_URL || publicBaseUrl()).replace(/\/+$/, '');
	if (!token) {
		say(
			`The app has the data folder open (pid ${pid}), so the backup must be written by it. Give the app and this command the same BACKUP_TOKEN (24+ characters) and run this again — or let the app's daily backups (DATA_DIR/backups) do it, or stop the app first.`
		);
		return 2;
	}
	say(`The app has the data folder open (pid ${pid}): asking it at ${base}/api/backups …`);
	const res = await fetch(`${base}/api/backups`, {
		method: 'POST',
		headers: { authorization: `Bearer ${token}` }
	});
	const body = (await res.json().catch(() => ({}))) as {
		message?: string;
		file?: string;
		bytes?: number;
		method?: Manifest['database']['method'];
		tool?: string;
	};
	if (!res.ok || !body.file) {
		say(`The app answered ${res.status}: ${body.message ?? res.statusText}`);
		return 1;
	}
	let file = body.file;
	if (out) {
		await fsp.mkdir(out, { recursive: true });
		const dest = path.join(out, path.basename(file));
		await fsp.copyFile(file, dest);
		file = dest;
	}
	say(`Wrote ${file} (${((body.bytes ?? 0) / 1e6).toFixed(2)} MB) through the running app.`);
	if (body.method) say(`Database: ${methods[body.method].says} — ${body.tool}.`);
	return 0;
}

async function direct(
	source: DbSource,
	outDir: string,
	record: (r: BackupResult | Error, startedAt: Date) => Promise<unknown>,
	say: Say
) {
	const store = getStore();
	const startedAt = new Date();
	try {
		const r = await writeBackup({ source, store, storeLabel: describeStore(store), outDir });
		await record(r, startedAt).catch(() => {});
		for (const line of summary(r.manifest, r.file, r.bytes)) say(line);
		return 0;
	} catch (e) {
		await record(e as Error, startedAt).catch(() => {});
		throw e;
	}
}

const attempt = (r: BackupResult | Error, startedAt: Date) =>
	r instanceof Error
		? {
				trigger: 'command' as const,
				status: 'failed' as const,
				startedAt,
				file: null,
				bytes: null,
				method: null,
				photos: null,
				error: r.message.slice(0, 1000)
			}
		: {
				trigger: 'command' as const,
				status: 'succeeded' as const,
				startedAt,
				file: path.basename(r.file),
				bytes: r.bytes,
				method: r.manifest.database.method,
				photos: r.manifest.photos.count,
				error: null
			};

export async function backupCommand(
	opts: { out?: string; url?: string },
	say: Say = console.log
): Promise<number> {
	const dir = dataDir();
	const outDir = path.resolve(opts.out ?? path.join(dir, 'backups'));
	const url = process.env.DATABASE_URL;
	if (url) {
		say('PostgreSQL server (DATABASE_URL): the database is copied with pg_dump (custom format).');
		const client = new pg.Client({ connectionString: url });
		const record = async (r: BackupResult | Error, at: Date) => {
			await client.connect();
			try {
				const q = async (s: string, p: unknown[] = []) => (await client.query(s, p)).rows;
				await recordAttemptRaw(q, (s) => q(s), attempt(r, at));
			} finally {
				await client.end();
			}
		};
		return direct({ kind: 'postgres', url }, outDir, record, say);
	}
	const pid = holder(dir);
	if (pid) return viaApp(pid, say, opts.out, opts.url);
	const pgdata = path.resolve(dir, 'pgdata');
	if (!fs.existsSync(pgdata)) {
		say(`No embedded database at ${pgdata}: set DATA_DIR to the app's data folder.`);
		return 2;
	}
	say(`The app is not running: reading its data folder ${path.resolve(dir)} directly.`);
	const lockFile = `${pgdata}.lock`;
	lockDataDir(lockFile);
	try {
		const client = await PGlite.create(pgdata);
		try {
			const q = async (s: string, p: unknown[] = []) =>
				(await client.query<Record<string, unknown>>(s, p)).rows;
			const record = (r: BackupResult | Error, at: Date) => recordAttemptRaw(q, (s) => q(s), attempt(r, at));
			return await direct({ kind: 'pglite', client }, outDir, record, say);
		} finally {
			await client.close();
		}
	} finally {
		releaseLock(lockFile);
	}
}

export async function restoreCommand(
	opts: { file: string; dataDir?: string },
	say: Say = console.log
): Promise<number> {
	const target = path.resolve(opts.dataDir ?? dataDir());
	const url = process.env.DATABASE_URL || null;
	say(
		`Checking ${opts.file} and restoring into ${target}${url ? ' and the database at DATABASE_URL' : ''} …`
	);
	const r = await restoreBackup({ file: opts.file, dataDir: target, databaseUrl: url });
	const m = r.manifest;
	const rows = Object.values(m.counts).reduce((a, b) => a + b, 0);
	say(
		`Checked the manifest and ${m.members.length} checksum${m.members.length === 1 ? '' : 's'}; the backup is from ${m.createdAt} (Tidemark ${m.appVersion}, migration level ${m.migrations.applied}).`
	);
	say(
		`Restored ${rows} rows in ${Object.keys(m.counts).length} tables (${methods[m.database.method].says}) and ${r.photos} photo files in ${(r.ms / 1000).toFixed(1)} s; every table's row count matches the manifest.`
	);
	say(
		`Start the app with DATA_DIR=${target}${url ? ' and the same DATABASE_URL' : ''}; it applies any newer migrations at start.`
	);
	return 0;
}
