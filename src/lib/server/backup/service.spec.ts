import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import type { RequestEvent } from '@sveltejs/kit';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { getDb } from '$lib/server/db';
import { backupRuns } from '$lib/server/db/schema';
import * as settings from '$lib/server/settings/queries';
import { BackupRefused } from './archive';
import { requireBackupCaller } from './http';
import { health, STALE_AFTER_MS } from './queries';
import { due } from './schedule';
import { BackupBusy, backupNow, prune } from './service';

// The running app's backups (in-memory database, files in a temporary folder): what is recorded,
// what the lead's Today makes of it, when the schedule takes one, and how old files are pruned.

let tmp: string;
const HOUR = 3_600_000;
const now = new Date('2026-03-10T09:00:00Z');
const ago = (ms: number) => new Date(now.getTime() - ms);

async function attempt(status: 'succeeded' | 'failed', finishedAt: Date, error: string | null = null) {
	const db = await getDb();
	await db
		.insert(backupRuns)
		.values({ trigger: 'schedule', status, startedAt: finishedAt, finishedAt, error });
}

beforeAll(async () => {
	tmp = await fs.mkdtemp(path.join(os.tmpdir(), 'tidemark-backups-'));
});
beforeEach(async () => {
	await (await getDb()).delete(backupRuns);
});
afterAll(async () => {
	await fs.rm(tmp, { recursive: true, force: true });
});

describe("the lead's Today line", () => {
	it('says nothing before the schedule’s first attempt, and asks for a backup when the schedule is off', async () => {
		expect(await health(now)).toBeNull();
		process.env.BACKUP_SCHEDULE = 'off';
		try {
			expect(await health(now)).toEqual({ kind: 'stale', lastSuccessAt: null });
		} finally {
			delete process.env.BACKUP_SCHEDULE;
		}
	});

	it('says nothing while the newest backup succeeded within two days', async () => {
		await attempt('succeeded', ago(STALE_AFTER_MS - HOUR));
		expect(await health(now)).toBeNull();
	});

	it('says so when the newest success is older than two days', async () => {
		await attempt('succeeded', ago(STALE_AFTER_MS + HOUR));
		expect(await health(now)).toEqual({ kind: 'stale', lastSuccessAt: ago(STALE_AFTER_MS + HOUR) });
	});

	it('says so when the newest attempt failed, with its reason and the last good one', async () => {
		await attempt('succeeded', ago(30 * HOUR));
		await attempt('failed', ago(HOUR), 'No space left on device');
		expect(await health(now)).toEqual({
			kind: 'failed',
			at: ago(HOUR),
			error: 'No space left on device',
			lastSuccessAt: ago(30 * HOUR)
		});
	});
});

describe('the schedule', () => {
	it('is due when the newest success is older than the interval, not before', async () => {
		await settings.setBackups({ everyHours: 24, keep: 14 });
		expect(await due(now)).toBe(true);
		await attempt('succeeded', ago(23 * HOUR));
		expect(await due(now)).toBe(false);
		await settings.setBackups({ everyHours: 12, keep: 14 });
		expect(await due(now)).toBe(true);
	});

	it('waits an hour after a failure before trying again', async () => {
		await attempt('failed', ago(10 * 60_000), 'pg_dump failed');
		expect(await due(now)).toBe(false);
		expect(await due(new Date(now.getTime() + HOUR))).toBe(true);
	});
});

// A backup copies and reopens the whole database: seconds each, more on a busy machine.
describe('backupNow', { timeout: 120_000 }, () => {
	it('writes a file, records the attempt and keeps only the newest N', async () => {
		await settings.setBackups({ everyHours: 24, keep: 2 });
		const dir = path.join(tmp, 'keep');
		await fs.mkdir(dir, { recursive: true });
		await fs.writeFile(path.join(dir, 'notes.txt'), 'not a backup: never pruned');
		const made: string[] = [];
		for (let i = 0; i < 3; i++) made.push(path.basename((await backupNow('lead', { outDir: dir })).file));
		const left = (await fs.readdir(dir)).sort();
		expect(left).toEqual(['notes.txt', ...made.slice(1)].sort());
		const rows = await (await getDb()).select().from(backupRuns);
		expect(rows).toHaveLength(3);
		expect(
			rows.every((r) => r.status === 'succeeded' && r.trigger === 'lead' && r.method === 'pglite-datadir')
		).toBe(true);
		expect(rows.map((r) => r.file).sort()).toEqual([...made].sort());
		expect(await health(new Date())).toBeNull();
	});

	it('writes one backup at a time in a process', async () => {
		const dir = path.join(tmp, 'busy');
		const first = backupNow('schedule', { outDir: dir });
		await expect(backupNow('lead', { outDir: dir })).rejects.toBeInstanceOf(BackupBusy);
		await first;
	});

	it('refuses without a data folder (DATA_DIR=memory://), recording nothing', async () => {
		await expect(backupNow('lead')).rejects.toBeInstanceOf(BackupRefused);
		expect(await (await getDb()).select().from(backupRuns)).toHaveLength(0);
	});

	it('records a failure with its reason', async () => {
		const file = path.join(tmp, 'a-file');
		await fs.writeFile(file, 'x');
		await expect(backupNow('schedule', { outDir: file })).rejects.toThrow();
		const [row] = await (await getDb()).select().from(backupRuns);
		expect(row.status).toBe('failed');
		expect(row.error).toMatch(/EEXIST|ENOTDIR|not a directory/i);
	});

	it('prunes by time, a same-second second backup counting as newer', async () => {
		const dir = path.join(tmp, 'order');
		await fs.mkdir(dir);
		const names = [
			'tidemark-backup-20260101T000000Z.tar.gz',
			'tidemark-backup-20260101T000000Z-2.tar.gz',
			'tidemark-backup-20260102T000000Z.tar.gz'
		];
		for (const n of names) await fs.writeFile(path.join(dir, n), '');
		expect(await prune(dir, 2)).toEqual([names[0]]);
	});
});

describe('who may ask the app for a backup', () => {
	const event = (authorization: string | null) =>
		({
			request: new Request('http://x/api/backups', {
				method: 'POST',
				headers: authorization ? { authorization } : {}
			}),
			locals: {},
			url: new URL('http://x/api/backups'),
			route: { id: '/api/backups' }
		}) as unknown as RequestEvent;

	it('accepts the command holding BACKUP_TOKEN and refuses a wrong one', () => {
		process.env.BACKUP_TOKEN = 'drill-token-0123456789abcdefghij';
		try {
			expect(requireBackupCaller(event('Bearer drill-token-0123456789abcdefghij'))).toBe('command');
			expect(() => requireBackupCaller(event('Bearer drill-token-0123456789abcdefghiX'))).toThrow();
			expect(() => requireBackupCaller(event(null))).toThrow();
		} finally {
			delete process.env.BACKUP_TOKEN;
		}
	});

	it('accepts no token at all when BACKUP_TOKEN is unset', () => {
		expect(() => requireBackupCaller(event('Bearer anything-at-all-0123456789'))).toThrow();
	});
});
