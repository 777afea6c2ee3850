import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { sql } from 'drizzle-orm';
import { openDatabase } from './index';
import { tryExclusive, withLock } from './exclusive';

// Several server processes on one PostgreSQL server: each pool below stands for a process.
const url = process.env.TEST_DATABASE_URL;

describe('one process at a time on the embedded database', () => {
	it('just runs the work (the data folder already belongs to one process)', async () => {
		expect(await withLock(null, 'x', async () => 7)).toBe(7);
		expect(await tryExclusive(null, 'x', async () => 8)).toEqual({ ran: true, value: 8 });
	});
});

describe.runIf(url)('one process at a time on a PostgreSQL server', () => {
	const name = `tidemark_exclusive_${randomUUID().slice(0, 8)}`;
	const fresh = new URL(url ?? 'postgres://unused/');
	fresh.pathname = `/${name}`;
	const admin = async (q: string) => {
		const c = new pg.Client({ connectionString: url });
		await c.connect();
		await c.query(q);
		await c.end();
	};
	const pools: pg.Pool[] = [];
	const pool = () => {
		const p = new pg.Pool({ connectionString: url, max: 3 });
		pools.push(p);
		return p;
	};

	beforeAll(() => admin(`create database ${name}`));
	afterAll(async () => {
		await Promise.all(pools.map((p) => p.end()));
		await admin(`drop database if exists ${name} with (force)`);
	});

	it('migrates an empty database from three processes starting at once', async () => {
		process.env.DATABASE_URL = fresh.href;
		try {
			const handles = await Promise.all([openDatabase(), openDatabase(), openDatabase()]);
			const { rows } = (await handles[0].db.execute(
				sql`select count(*)::int as n from drizzle.__drizzle_migrations`
			)) as unknown as { rows: { n: number }[] };
			await Promise.all(handles.map((h) => h.close()));
			const journal = JSON.parse(fs.readFileSync(path.resolve('drizzle/meta/_journal.json'), 'utf8'));
			expect(rows[0].n).toBe(journal.entries.length);
		} finally {
			delete process.env.DATABASE_URL;
		}
	});

	it('runs waiting work one process after the other', async () => {
		const lock = `test-${randomUUID()}`;
		const log: string[] = [];
		const work = (who: string) => async () => {
			log.push(`${who} in`);
			await new Promise((r) => setTimeout(r, 100));
			log.push(`${who} out`);
		};
		await Promise.all([withLock(pool(), lock, work('a')), withLock(pool(), lock, work('b'))]);
		expect(log).toHaveLength(4);
		// Never two inside at once: each "in" is followed by its own "out".
		expect(log[1]).toBe(log[0].replace('in', 'out'));
		expect(log[3]).toBe(log[2].replace('in', 'out'));
	});

	it('skips background work another process is doing, and runs it once that one is done', async () => {
		const lock = `test-${randomUUID()}`;
		let release!: () => void;
		const held = new Promise<void>((r) => (release = r));
		const first = tryExclusive(pool(), lock, () => held.then(() => 'first'));
		await new Promise((r) => setTimeout(r, 200));
		expect(await tryExclusive(pool(), lock, async () => 'second')).toEqual({ ran: false });
		release();
		expect(await first).toEqual({ ran: true, value: 'first' });
		expect(await tryExclusive(pool(), lock, async () => 'third')).toEqual({ ran: true, value: 'third' });
	});
});
