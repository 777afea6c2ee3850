import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import * as tar from 'tar';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getDb } from '$lib/server/db';
import { payments } from '$lib/server/db/schema';
import { getStore } from '$lib/server/storage';
import { LocalStore } from '$lib/server/storage/local';
import { buildWorld, intake, type World } from '$lib/server/testing/world';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import * as photos from '$lib/server/photos/queries';
import { recordEvent } from '$lib/server/runs/commit';
import { png } from '$lib/server/photos/fixtures';
import { FLOW } from '$lib/server/testing/world';
import { BackupRefused } from './archive';
import { writeBackup } from './create';
import { tables, type Query } from './facts';
import { codeMigrationLevel } from './manifest';
import { restoreBackup } from './restore';

// The restore drill: a shop with jobs, runs with answered steps, photos and a payment is backed up
// from the live (in-memory) database, restored into a new folder, and the restored database and
// photo folder are opened and compared with the originals table by table and photo by photo.

let w: World;
let tmp: string;
let backupFile: string;

const q =
	(client: PGlite): Query =>
	async (s) =>
		(await client.query<Record<string, unknown>>(s)).rows;

/** Every table's rows, as one digest per table: equal digests mean equal contents. */
async function contents(client: PGlite) {
	const out: Record<string, string> = {};
	for (const t of await tables(q(client))) {
		const [row] = await q(client)(
			`select count(*)::int as n, md5(coalesce(string_agg(t::text, '|' order by t::text), '')) as h from ${t.sql} t`
		);
		out[t.name] = `${row.n}:${row.h}`;
	}
	return out;
}

const live = async () => ((await getDb()) as unknown as { $client: PGlite }).$client;
const sha = (b: Uint8Array) => crypto.createHash('sha256').update(b).digest('hex');

beforeAll(async () => {
	tmp = await fs.mkdtemp(path.join(os.tmpdir(), 'tidemark-drill-'));
	w = await buildWorld();
	const db = await getDb();
	// A second job with its own run, two answered steps and a second photo taken at a step.
	const job = await jobs.create(w.tech.id, intake(3));
	await jobs.assignTechnician(job.id, w.tech.id, w.lead.id);
	const run = await runs.start(job.id, FLOW, w.tech);
	await recordEvent(
		run.id,
		{
			type: 'ANSWER',
			stepId: 'power-on-as-received',
			outcome: 'Boots to the lock screen and stays up',
			idempotencyKey: 'drill-0001'
		},
		w.tech
	);
	await photos.add(
		w.tech.id,
		{ jobId: job.id, runId: run.id, stepId: 'power-on-as-received' },
		{
			bytes: await png(80, 60),
			source: 'phone',
			caption: 'Board after cleaning'
		}
	);
	await db.insert(payments).values({
		referenceType: 'job',
		referenceId: job.id,
		description: 'Board-level repair',
		amountMinor: 12_900,
		currency: 'eur',
		status: 'paid',
		providerSessionId: 'cs_drill_0001',
		paidAt: new Date()
	});
}, 120_000);

afterAll(async () => {
	await fs.rm(tmp, { recursive: true, force: true });
});

describe('restore drill', { timeout: 120_000 }, () => {
	it('backs up the running database and every photo with a manifest', async () => {
		const result = await writeBackup({
			source: { kind: 'pglite', client: await live() },
			store: getStore(),
			storeLabel: 'storage interface (memory)',
			outDir: path.join(tmp, 'backups')
		});
		backupFile = result.file;
		const m = result.manifest;
		expect(path.basename(result.file)).toMatch(/^tidemark-backup-\d{8}T\d{6}Z\.tar\.gz$/);
		expect(m.database.method).toBe('pglite-datadir');
		expect(m.migrations).toEqual(codeMigrationLevel());
		expect(m.counts.jobs).toBe(3);
		expect(m.counts.run_steps).toBeGreaterThanOrEqual(1);
		expect(m.counts.payments).toBe(1);
		expect(m.counts.attachments).toBe(2);
		expect(m.photos.missing).toEqual([]);
		// Each photo has three stored variants (original, display, thumbnail).
		expect(m.photos.count).toBe(6);
		expect(m.members.filter((x) => x.path.startsWith('photos/'))).toHaveLength(6);
		const names: string[] = [];
		await tar.list({ file: result.file, onReadEntry: (e) => void names.push(e.path) });
		expect(names[0]).toBe('manifest.json');
	});

	it('restores into a new folder where the app database and photos are the same', async () => {
		const target = path.join(tmp, 'restored');
		const r = await restoreBackup({ file: backupFile, dataDir: target });
		expect(r.photos).toBe(6);

		const restored = await PGlite.create(path.join(target, 'pgdata'));
		try {
			const [before, after] = [await contents(await live()), await contents(restored)];
			expect(Object.keys(after).length).toBeGreaterThan(20);
			expect(after).toEqual(before);
			const [{ n }] = await q(restored)(`select count(*)::int as n from run_steps`);
			expect(n).toBeGreaterThanOrEqual(1);
		} finally {
			await restored.close();
		}

		const db = await getDb();
		const rows = await db.query.attachments.findMany();
		const store = new LocalStore(path.join(target, 'uploads'));
		for (const a of rows)
			for (const key of [a.originalKey, a.displayKey, a.thumbKey]) {
				const bytes = await store.get(key);
				expect(bytes && sha(bytes)).toBe(key);
				expect(bytes).toEqual(await getStore().get(key));
			}
	});

	it('refuses a target folder that is not empty, and leaves it alone', async () => {
		const target = path.join(tmp, 'busy');
		await fs.mkdir(target);
		await fs.writeFile(path.join(target, 'keep.txt'), 'live data');
		await expect(restoreBackup({ file: backupFile, dataDir: target })).rejects.toThrow(/not empty/);
		expect(await fs.readdir(target)).toEqual(['keep.txt']);
	});

	it('refuses a backup whose checksum does not match, writing nothing', async () => {
		const work = path.join(tmp, 'tamper');
		await fs.mkdir(work);
		await tar.extract({ file: backupFile, cwd: work });
		const photo = (await fs.readdir(path.join(work, 'photos')))[0];
		const f = path.join(work, 'photos', photo);
		const bytes = await fs.readFile(f);
		bytes[bytes.length - 1] ^= 0xff;
		await fs.writeFile(f, bytes);
		const bad = path.join(tmp, 'tampered.tar.gz');
		await tar.create({ gzip: true, file: bad, cwd: work }, await fs.readdir(work));
		const target = path.join(tmp, 'from-tampered');
		const e = await restoreBackup({ file: bad, dataDir: target }).catch((x) => x);
		expect(e).toBeInstanceOf(BackupRefused);
		expect(e.message).toMatch(new RegExp(`Checksum mismatch for photos/${photo}`));
		expect(await fs.readdir(target).catch(() => null)).toBeNull();
	});

	it('refuses a backup from a newer migration level than this code knows', async () => {
		const work = path.join(tmp, 'newer');
		await fs.mkdir(work);
		await tar.extract({ file: backupFile, cwd: work });
		const mf = path.join(work, 'manifest.json');
		const manifest = JSON.parse(await fs.readFile(mf, 'utf8'));
		const code = codeMigrationLevel();
		manifest.migrations = {
			applied: code.applied + 1,
			latestMillis: code.latestMillis + 86_400_000,
			latestHash: 'f'.repeat(64),
			latestTag: null
		};
		await fs.writeFile(mf, JSON.stringify(manifest));
		const newer = path.join(tmp, 'newer.tar.gz');
		await tar.create({ gzip: true, file: newer, cwd: work }, await fs.readdir(work));
		const target = path.join(tmp, 'from-newer');
		await expect(restoreBackup({ file: newer, dataDir: target })).rejects.toThrow(
			new RegExp(
				`migration level ${code.applied + 1} .*newer than this version of Tidemark knows \\(${code.applied}`
			)
		);
		expect(await fs.readdir(target).catch(() => null)).toBeNull();
	});
});
