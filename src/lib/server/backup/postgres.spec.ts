import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getHandle } from '$lib/server/db';
import { getStore } from '$lib/server/storage';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import * as photos from '$lib/server/photos/queries';
import * as library from '$lib/server/flows/queries';
import { recordEvent } from '$lib/server/runs/commit';
import { png } from '$lib/server/photos/fixtures';
import { FLOW, intake } from '$lib/server/testing/world';
import { writeBackup, type BackupResult } from './create';
import { tables } from './facts';
import { restoreBackup } from './restore';

// The pg_dump lane: a shop on a PostgreSQL server is backed up with pg_dump (custom format, one
// snapshot), restored with pg_restore into another empty database, and compared table by table.
// Needs TEST_DATABASE_URL (.ci/run starts a server); it makes and drops its own two databases there.
const url = process.env.TEST_DATABASE_URL;
const title = url
	? 'backup and restore on a PostgreSQL server (pg_dump lane)'
	: 'pg_dump lane — skipped: TEST_DATABASE_URL is not set, so there is no PostgreSQL server to dump';

const suffix = randomUUID().slice(0, 8);
const names = { src: `tidemark_bk_src_${suffix}`, dst: `tidemark_bk_dst_${suffix}` };
const urlOf = (db: string) => {
	const u = new URL(url!);
	u.pathname = `/${db}`;
	return u.toString();
};

async function admin<T>(fn: (c: pg.Client) => Promise<T>) {
	const c = new pg.Client({ connectionString: url });
	await c.connect();
	try {
		return await fn(c);
	} finally {
		await c.end();
	}
}

async function contents(dbUrl: string) {
	const c = new pg.Client({ connectionString: dbUrl });
	await c.connect();
	try {
		const q = async (s: string) => (await c.query(s)).rows;
		const out: Record<string, string> = {};
		for (const t of await tables(q)) {
			const [row] = await q(
				`select count(*)::int as n, md5(coalesce(string_agg(t::text, '|' order by t::text), '')) as h from ${t.sql} t`
			);
			out[t.name] = `${row.n}:${row.h}`;
		}
		return out;
	} finally {
		await c.end();
	}
}

describe.runIf(url)(title, { timeout: 120_000 }, () => {
	const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-pg-backup-'));
	let result: BackupResult;

	beforeAll(async () => {
		await admin(async (c) => {
			await c.query(`create database ${names.src}`);
			await c.query(`create database ${names.dst}`);
		});
		await closeDb();
		process.env.DATABASE_URL = urlOf(names.src);
		expect((await getHandle()).kind).toBe('postgres');
		const flows = path.join(tmp, 'flows');
		fs.mkdirSync(flows);
		fs.copyFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), path.join(flows, `${FLOW}.flow.yaml`));
		await library.importFromFiles(flows);
		const tech = await staff.create(null, {
			name: 'Ines Marrow',
			email: 'ines@shop.test',
			role: 'technician',
			password: 'tech-password-1'
		});
		const job = await jobs.create(tech.id, intake(7));
		const run = await runs.start(job.id, FLOW, tech);
		await recordEvent(
			run.id,
			{
				type: 'ANSWER',
				stepId: 'power-on-as-received',
				outcome: 'Boots to the lock screen and stays up',
				idempotencyKey: 'pg-lane-0001'
			},
			tech
		);
		await photos.add(tech.id, { jobId: job.id }, { bytes: await png(), source: 'phone', caption: 'Board' });
	}, 120_000);

	afterAll(async () => {
		await closeDb();
		delete process.env.DATABASE_URL;
		await admin(async (c) => {
			await c.query(`drop database if exists ${names.src} with (force)`);
			await c.query(`drop database if exists ${names.dst} with (force)`);
		});
		fs.rmSync(tmp, { recursive: true, force: true });
	});

	it('backs up with pg_dump and says so in the manifest', async () => {
		result = await writeBackup({
			source: { kind: 'postgres', url: urlOf(names.src) },
			store: getStore(),
			storeLabel: 'storage interface (memory)',
			outDir: path.join(tmp, 'backups')
		});
		const m = result.manifest;
		expect(m.database.method).toBe('pg_dump-custom');
		expect(m.database.member).toBe('database/postgres.dump');
		expect(m.database.tool).toMatch(/^pg_dump \(PostgreSQL\) \d+/);
		expect(m.counts.jobs).toBe(1);
		expect(m.counts.run_steps).toBeGreaterThanOrEqual(1);
		expect(m.photos).toMatchObject({ count: 3, missing: [] });
	});

	it('restores with pg_restore into an empty database and an empty folder, the same table by table', async () => {
		const r = await restoreBackup({
			file: result.file,
			dataDir: path.join(tmp, 'restored'),
			databaseUrl: urlOf(names.dst)
		});
		expect(r.photos).toBe(3);
		expect(await contents(urlOf(names.dst))).toEqual(await contents(urlOf(names.src)));
		expect(fs.readdirSync(path.join(tmp, 'restored', 'uploads')).length).toBeGreaterThan(0);
	});

	it('refuses a database that is not empty', async () => {
		await expect(
			restoreBackup({ file: result.file, dataDir: path.join(tmp, 'again'), databaseUrl: urlOf(names.dst) })
		).rejects.toThrow(/already has \d+ tables/);
	});

	it('refuses a pg_dump backup without a database to restore into', async () => {
		await expect(restoreBackup({ file: result.file, dataDir: path.join(tmp, 'nodb') })).rejects.toThrow(
			/set DATABASE_URL to an empty PostgreSQL database/
		);
	});
});

describe.skipIf(url)(title, () => {
	it.skip('needs TEST_DATABASE_URL (a disposable PostgreSQL server; .ci/run starts one)', () => {});
});
