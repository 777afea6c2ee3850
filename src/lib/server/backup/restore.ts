/**
 * Restores a backup file into an EMPTY data folder (and, for a pg_dump backup, an empty PostgreSQL
 * database): never over live data. Before anything is written the manifest and every checksum are
 * checked and a migration level newer than this code is refused; afterwards the restored database's
 * row counts must equal the manifest's.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs/promises';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import pg from 'pg';
import { lockDataDir, releaseLock } from '$lib/server/db/lock';
import { LocalStore } from '$lib/server/storage/local';
import type { BlobStore } from '$lib/server/storage/keys';
import { BackupRefused, unpackAndVerify } from './archive';
import { backupConfig } from './config';
import { pgArgs } from './create';
import { rowCounts, type Query } from './facts';
import { methods, newerThanCode, type Manifest } from './manifest';

export type RestoreResult = { manifest: Manifest; photos: number; ms: number };

async function entriesOf(dir: string): Promise<string[] | null> {
	try {
		return await fs.readdir(dir);
	} catch (e) {
		if ((e as NodeJS.ErrnoException).code === 'ENOENT') return null;
		throw e;
	}
}

export async function assertEmptyFolder(dir: string) {
	const entries = await entriesOf(dir);
	if (entries?.length)
		throw new BackupRefused(
			`${dir} is not empty (${entries.slice(0, 3).join(', ')}${entries.length > 3 ? ', …' : ''}). ` +
				'A restore never writes over existing data: choose a new or empty folder.'
		);
}

async function assertEmptyDatabase(url: string) {
	const client = new pg.Client({ connectionString: url });
	await client.connect();
	try {
		const { rows } = await client.query(
			`select count(*)::int as n from pg_tables where schemaname in ('public', 'drizzle')`
		);
		if (rows[0].n > 0)
			throw new BackupRefused(
				`The database at DATABASE_URL already has ${rows[0].n} tables. A restore never writes over existing data: create an empty database (createdb) and point DATABASE_URL at it.`
			);
	} finally {
		await client.end();
	}
}

function sameCounts(expected: Record<string, number>, got: Record<string, number>) {
	const diff = [...new Set([...Object.keys(expected), ...Object.keys(got)])].filter(
		(t) => expected[t] !== got[t]
	);
	if (diff.length)
		throw new Error(
			`The restored database does not match the manifest: ${diff
				.slice(0, 5)
				.map((t) => `${t} ${got[t] ?? 'missing'} rows, expected ${expected[t] ?? 'none'}`)
				.join('; ')}.`
		);
}

function pgRestore(file: string, url: string): Promise<void> {
	const { dbname, env } = pgArgs(url);
	const bin = backupConfig().PG_RESTORE;
	const args = [
		'--no-owner',
		'--no-privileges',
		'--exit-on-error',
		'--single-transaction',
		`--dbname=${dbname}`,
		file
	];
	return new Promise((resolve, reject) => {
		const child = spawn(bin, args, { env, stdio: ['ignore', 'ignore', 'pipe'] });
		let err = '';
		child.stderr.on('data', (d) => (err += d));
		child.on('error', reject);
		child.on('close', (code) =>
			code === 0 ? resolve() : reject(new Error(`pg_restore failed (exit ${code}): ${err.trim()}`))
		);
	});
}

export async function restoreBackup(opts: {
	file: string;
	/** The data folder to restore into: absent or empty. */
	dataDir: string;
	/** For a pg_dump backup: an empty PostgreSQL database. */
	databaseUrl?: string | null;
	/** Where photos go; the target folder's uploads/ by default. */
	store?: BlobStore;
}): Promise<RestoreResult> {
	const t0 = performance.now();
	const target = path.resolve(opts.dataDir);
	await assertEmptyFolder(target);
	const parent = path.dirname(target);
	await fs.mkdir(parent, { recursive: true });
	const work = await fs.mkdtemp(path.join(parent, '.tidemark-restore-'));
	let lockFile: string | null = null;
	let wrote = false;
	try {
		const manifest = await unpackAndVerify(path.resolve(opts.file), work);
		const newer = newerThanCode(manifest.migrations);
		if (newer) throw new BackupRefused(newer);
		const method = manifest.database.method;
		if (method === 'pglite-datadir' && opts.databaseUrl)
			throw new BackupRefused(
				'This backup holds an embedded database (PGlite data folder); unset DATABASE_URL to restore it into a data folder.'
			);
		if (method === 'pg_dump-custom' && !opts.databaseUrl)
			throw new BackupRefused(
				"This backup was made with PostgreSQL's pg_dump; set DATABASE_URL to an empty PostgreSQL database to restore it."
			);
		if (opts.databaseUrl) await assertEmptyDatabase(opts.databaseUrl);
		// Checked again: the folder may have been filled while the archive was read.
		await assertEmptyFolder(target);
		await fs.mkdir(target, { recursive: true });
		wrote = true;
		const dbFile = path.join(work, methods[method].member);

		if (method === 'pglite-datadir') {
			const pgdata = path.join(target, 'pgdata');
			lockFile = `${pgdata}.lock`;
			lockDataDir(lockFile); // the app cannot open the folder while it is being filled
			const dump = new Blob([new Uint8Array(await fs.readFile(dbFile))]);
			const client = await PGlite.create(pgdata, { loadDataDir: dump });
			try {
				const q: Query = async (s) => (await client.query<Record<string, unknown>>(s)).rows;
				sameCounts(manifest.counts, await rowCounts(q));
			} finally {
				await client.close();
			}
		} else {
			await pgRestore(dbFile, opts.databaseUrl!);
			const client = new pg.Client({ connectionString: opts.databaseUrl! });
			await client.connect();
			try {
				sameCounts(manifest.counts, await rowCounts(async (s) => (await client.query(s)).rows));
			} finally {
				await client.end();
			}
		}

		const store = opts.store ?? new LocalStore(path.join(target, 'uploads'));
		let photos = 0;
		for (const m of manifest.members.filter((m) => m.path.startsWith('photos/'))) {
			const key = path.posix.basename(m.path);
			const { key: stored } = await store.put(new Uint8Array(await fs.readFile(path.join(work, m.path))));
			if (stored !== key)
				throw new Error(`Photo ${key} does not hash to its own key; the backup is damaged.`);
			photos++;
		}
		wrote = false; // finished: keep what was written
		return { manifest, photos, ms: Math.round(performance.now() - t0) };
	} finally {
		if (lockFile) releaseLock(lockFile);
		await fs.rm(work, { recursive: true, force: true });
		// A restore that failed part-way leaves the folder as empty as it found it.
		if (wrote)
			for (const name of (await entriesOf(target)) ?? [])
				await fs.rm(path.join(target, name), { recursive: true, force: true });
	}
}
