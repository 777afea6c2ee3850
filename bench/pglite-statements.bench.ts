// PGlite's own `query` against the same client with prepared statements
// (src/lib/server/db/pglite-statements.ts), in process: a lookup by key, a guarded update by key,
// and the lookup through Drizzle as the app makes it. Per call, median of 15 batches of 200 after
// warm-up, on a data folder in the system's temporary directory (as the app's DATA_DIR).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { drizzle } from 'drizzle-orm/pglite';
import { eq, sql } from 'drizzle-orm';
import { integer, pgTable, text, uuid } from 'drizzle-orm/pg-core';
import { withPreparedStatements } from '../src/lib/server/db/pglite-statements';
// @ts-expect-error plain JS helper shared by the benchmarks
import { median } from './lib.mjs';

const things = pgTable('things', {
	id: uuid('id').primaryKey(),
	name: text('name').notNull(),
	lastSeq: integer('last_seq').notNull()
});

async function client(prepared: boolean) {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-pglite-bench-'));
	const pg = await PGlite.create(path.join(dir, 'pgdata'));
	await pg.exec(`create table things (id uuid primary key default gen_random_uuid(), name text not null,
		last_seq integer not null default 0);
		insert into things (name) select 'thing ' || g from generate_series(1, 2000) g;`);
	const ids = (await pg.query<{ id: string }>('select id from things')).rows.map((r) => r.id);
	const close = async () => {
		await pg.close();
		fs.rmSync(dir, { recursive: true, force: true });
	};
	return { pg: prepared ? withPreparedStatements(pg) : pg, ids, close };
}

async function perCall(fn: (i: number) => Promise<unknown>) {
	for (let i = 0; i < 500; i++) await fn(i);
	const batches: number[] = [];
	for (let b = 0; b < 15; b++) {
		const t0 = performance.now();
		for (let i = 0; i < 200; i++) await fn(b * 200 + i);
		batches.push((performance.now() - t0) / 200);
	}
	return median(batches) as number;
}

const figures: Record<string, number[]> = {};
for (const prepared of [false, true]) {
	const { pg, ids, close } = await client(prepared);
	const db = drizzle({ client: pg });
	const lookup = db
		.select()
		.from(things)
		.where(eq(things.id, sql.placeholder('id')))
		.prepare('lookup');
	const rows = {
		'lookup by key': await perCall((i) => pg.query('select * from things where id = $1', [ids[i % 2000]])),
		'guarded update by key': await perCall((i) =>
			pg.query('update things set last_seq = last_seq + 1 where id = $1 and last_seq >= $2', [
				ids[i % 2000],
				0
			])
		),
		'lookup by key through Drizzle': await perCall((i) => lookup.execute({ id: ids[i % 2000] }))
	};
	for (const [name, ms] of Object.entries(rows)) (figures[name] ??= []).push(ms);
	await close();
}
console.log('| per call | PGlite query | prepared statements | ratio |');
console.log('|---|---|---|---|');
for (const [name, [own, prepared]] of Object.entries(figures))
	console.log(
		`| ${name} | ${own.toFixed(3)} ms | ${prepared.toFixed(3)} ms | ${(own / prepared).toFixed(2)} |`
	);
