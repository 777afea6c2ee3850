/**
 * Writes one backup file: the database copied by its own engine's tool, every photo the copy names
 * read back through the storage interface, and a manifest with counts and checksums.
 *
 * Embedded (PGlite): a CHECKPOINT, then dumpDataDir() while no transaction is open (it holds
 * PGlite's transaction lock), so the copy is a consistent data folder; the counts and photo keys
 * are read from that copy, opened in memory, which also proves it opens.
 * PostgreSQL: one read-only REPEATABLE READ transaction exports its snapshot; pg_dump dumps that
 * same snapshot (--snapshot) while the counts and photo keys are read inside it.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs/promises';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import pg from 'pg';
import { keyOf, type BlobStore } from '$lib/server/storage/keys';
import { describeMembers, filesUnder, pack } from './archive';
import { backupConfig } from './config';
import { migrationLevel, photoKeys, rowCounts, type Query } from './facts';
import { appVersion, FORMAT, MANIFEST, methods, type Manifest, type Method } from './manifest';

export type DbSource = { kind: 'pglite'; client: PGlite } | { kind: 'postgres'; url: string };
export type BackupResult = { file: string; bytes: number; manifest: Manifest; ms: number };

const pgliteQuery =
	(client: PGlite): Query =>
	async (s) =>
		(await client.query<Record<string, unknown>>(s)).rows;

/** The file name for a backup taken at `now`: sorts by time, one per second at most. */
export function backupName(now: Date) {
	return `tidemark-backup-${now
		.toISOString()
		.replace(/[-:]/g, '')
		.replace(/\.\d+Z$/, 'Z')}.tar.gz`;
}
export const backupNamePattern = /^tidemark-backup-\d{8}T\d{6}Z(-\d+)?\.tar\.gz$/;

type DbFacts = {
	counts: Record<string, number>;
	level: Manifest['migrations'];
	keys: string[];
	tool: string;
};

async function factsOf(q: Query, tool: string): Promise<DbFacts> {
	return { counts: await rowCounts(q), level: await migrationLevel(q), keys: await photoKeys(q), tool };
}

async function copyPglite(client: PGlite, dest: string): Promise<DbFacts> {
	await client.exec('CHECKPOINT');
	const dump = await client._runExclusiveTransaction(() => client.dumpDataDir('none'));
	await fs.writeFile(dest, new Uint8Array(await dump.arrayBuffer()));
	const copy = await PGlite.create({ loadDataDir: dump });
	try {
		const [{ v }] = (await copy.query<{ v: string }>(`select current_setting('server_version') as v`)).rows;
		return await factsOf(pgliteQuery(copy), `PGlite (PostgreSQL ${v})`);
	} finally {
		await copy.close();
	}
}

export function pgDumpBinary() {
	return backupConfig().PG_DUMP;
}

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv): Promise<string> {
	return new Promise((resolve, reject) => {
		const child = spawn(cmd, args, { env, stdio: ['ignore', 'pipe', 'pipe'] });
		let out = '';
		let err = '';
		child.stdout.on('data', (d) => (out += d));
		child.stderr.on('data', (d) => (err += d));
		child.on('error', (e) =>
			reject(
				(e as NodeJS.ErrnoException).code === 'ENOENT'
					? new Error(
							`${cmd} was not found: install the PostgreSQL client tools or set PG_DUMP / PG_RESTORE.`
						)
					: e
			)
		);
		child.on('close', (code) =>
			code === 0
				? resolve(out)
				: reject(new Error(`${path.basename(cmd)} failed (exit ${code}): ${err.trim()}`))
		);
	});
}

/** The URL without its password, and an environment carrying it, so the password is not on a command line. */
export function pgArgs(url: string) {
	const u = new URL(url);
	const env = { ...process.env };
	if (u.password) env.PGPASSWORD = decodeURIComponent(u.password);
	u.password = '';
	return { dbname: u.toString(), env };
}

async function copyPostgres(url: string, dest: string): Promise<DbFacts> {
	const client = new pg.Client({ connectionString: url });
	await client.connect();
	try {
		await client.query('begin isolation level repeatable read read only');
		const snap = String((await client.query('select pg_export_snapshot() as s')).rows[0].s);
		const facts = await factsOf(async (s) => (await client.query(s)).rows, '');
		const { dbname, env } = pgArgs(url);
		const bin = pgDumpBinary();
		const version = (await run(bin, ['--version'], env)).trim();
		await run(
			bin,
			[
				'--format=custom',
				`--snapshot=${snap}`,
				'--no-owner',
				'--no-privileges',
				`--file=${dest}`,
				`--dbname=${dbname}`
			],
			env
		);
		await client.query('commit');
		return { ...facts, tool: version };
	} finally {
		await client.end();
	}
}

export async function writeBackup(opts: {
	source: DbSource;
	store: BlobStore;
	/** Says in the manifest how photos were read (e.g. "storage interface (local folder)"). */
	storeLabel: string;
	outDir: string;
	now?: Date;
}): Promise<BackupResult> {
	const t0 = performance.now();
	const now = opts.now ?? new Date();
	await fs.mkdir(opts.outDir, { recursive: true });
	const staging = await fs.mkdtemp(path.join(opts.outDir, '.staging-'));
	try {
		const method: Method = opts.source.kind === 'pglite' ? 'pglite-datadir' : 'pg_dump-custom';
		const member = methods[method].member;
		await fs.mkdir(path.join(staging, 'database'));
		const dest = path.join(staging, member);
		const facts =
			opts.source.kind === 'pglite'
				? await copyPglite(opts.source.client, dest)
				: await copyPostgres(opts.source.url, dest);

		const missing: string[] = [];
		if (facts.keys.length) await fs.mkdir(path.join(staging, 'photos'));
		for (const key of facts.keys) {
			const bytes = await opts.store.get(key);
			// Content-addressed: a blob whose bytes do not hash to its key is as good as missing.
			if (!bytes || keyOf(bytes) !== key) missing.push(key);
			else await fs.writeFile(path.join(staging, 'photos', key), bytes);
		}

		const members = await describeMembers(staging, await filesUnder(staging));
		const manifest: Manifest = {
			format: FORMAT,
			formatVersion: 1,
			createdAt: now.toISOString(),
			appVersion,
			database: { method, tool: facts.tool, member },
			migrations: facts.level,
			counts: facts.counts,
			photos: { source: opts.storeLabel, count: facts.keys.length - missing.length, missing },
			members
		};
		await fs.writeFile(path.join(staging, MANIFEST), JSON.stringify(manifest, null, '\t') + '\n');
		let file = path.join(opts.outDir, backupName(now));
		for (let n = 2; await exists(file); n++)
			file = path.join(opts.outDir, backupName(now).replace('.tar.gz', `-${n}.tar.gz`));
		await pack(staging, file);
		return { file, bytes: (await fs.stat(file)).size, manifest, ms: Math.round(performance.now() - t0) };
	} finally {
		await fs.rm(staging, { recursive: true, force: true });
	}
}

const exists = (f: string) =>
	fs.access(f).then(
		() => true,
		() => false
	);
