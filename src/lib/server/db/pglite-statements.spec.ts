import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PGlite } from '@electric-sql/pglite';
import { STATEMENTS_KEPT, withPreparedStatements } from './pglite-statements';

// The prepared path must answer exactly as PGlite's own `query` does: both clients run the same
// statements on the same schema and their results are compared field by field.
describe('PGlite queries through prepared statements', () => {
	let plain: PGlite;
	let prepared: PGlite;
	const schema = `create table t (
		id int primary key, name text, born timestamptz, tags text[], doc jsonb, amount numeric(8,2),
		big bigint, ok boolean, raw bytea, day date
	)`;

	beforeAll(async () => {
		plain = await PGlite.create();
		prepared = withPreparedStatements(await PGlite.create());
		for (const db of [plain, prepared]) await db.exec(schema);
	});
	afterAll(async () => {
		await plain?.close();
		await prepared?.close();
	});

	const insert = `insert into t (id, name, born, tags, doc, amount, big, ok, raw, day)
		values ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10) returning *`;
	const values = (id: number) => [
		id,
		`name ${id} 'quoted' "and" \\ backslash`,
		new Date(Date.UTC(2026, 11, 4, 10, 30, id)),
		['a', 'b c', 'd"e'],
		{ nested: { list: [1, 2, id] }, text: 'ü ✓' },
		'12.50',
		9007199254740993n,
		id % 2 === 0,
		new Uint8Array([0, 1, 254, 255]),
		'2026-12-04'
	];

	it('writes and reads every common column type as PGlite does', async () => {
		for (const id of [1, 2, 3]) {
			const a = await plain.query(insert, values(id));
			const b = await prepared.query(insert, values(id));
			expect(b.rows).toEqual(a.rows);
			expect(b.fields).toEqual(a.fields);
			expect(b.affectedRows).toBe(a.affectedRows);
		}
		const select = 'select * from t where id = $1 or name is null order by id';
		for (const id of [1, 2, 3, 4])
			expect((await prepared.query(select, [id])).rows).toEqual((await plain.query(select, [id])).rows);
		expect((await prepared.query(select, [2])).rows[0]).toMatchObject({
			id: 2,
			ok: true,
			tags: ['a', 'b c', 'd"e']
		});
	});

	it('answers in array mode, with per-query parsers, and with null parameters', async () => {
		const q = 'select id, born, $2::text as extra from t where id = $1';
		const options = { rowMode: 'array' as const, parsers: { 1184: (v: string) => `as text: ${v}` } };
		const a = await plain.query(q, [1, null], options);
		const b = await prepared.query(q, [1, null], options);
		expect(b.rows).toEqual(a.rows);
		expect(b.rows[0]).toEqual([1, expect.stringMatching(/^as text: 2026-12-04/), null]);
	});

	it('sends text of every width byte for byte, and binary values a serializer returns', async () => {
		const q = 'select $1::text as t, octet_length($1::text) as n, $2::bytea as b';
		const text = "plain ä € 🌊 \\x00 '; drop table t; -- " + 'long '.repeat(2000);
		const binary = { serializers: { 17: (x: Uint8Array) => x as unknown as string } };
		const bytes = new Uint8Array([0, 92, 120, 255]);
		const a = await plain.query(q, [text, bytes], binary);
		const b = await prepared.query(q, [text, bytes], binary);
		expect(b.rows).toEqual(a.rows);
		expect(b.rows[0]).toMatchObject({ t: text, n: Buffer.byteLength(text), b: bytes });
	});

	it('reports an update without rows the same way', async () => {
		const q = 'update t set name = $2 where id = $1';
		const a = await plain.query(q, [99, 'x']);
		const b = await prepared.query(q, [99, 'x']);
		expect(b).toMatchObject({ affectedRows: 0, rows: [] });
		expect(b.affectedRows).toBe(a.affectedRows);
	});

	it('fails with the database error and its code, and goes on answering', async () => {
		const dup = prepared.query(insert, values(1));
		await expect(dup).rejects.toMatchObject({ code: '23505', query: insert });
		await expect(prepared.query('select * from nowhere')).rejects.toMatchObject({ code: '42P01' });
		await expect(prepared.query('select $1::int', ['not a number'])).rejects.toMatchObject({ code: '22P02' });
		expect((await prepared.query('select count(*)::int as n from t')).rows).toEqual([{ n: 3 }]);
	});

	it('keeps a transaction whole: its statements roll back together, and a closed one refuses', async () => {
		let kept: Awaited<Parameters<Parameters<PGlite['transaction']>[0]>[0]> | undefined;
		await expect(
			prepared.transaction(async (tx) => {
				kept = tx;
				await tx.query(insert, values(10));
				expect((await tx.query('select count(*)::int as n from t')).rows).toEqual([{ n: 4 }]);
				await tx.query(insert, values(10));
			})
		).rejects.toMatchObject({ code: '23505' });
		expect((await prepared.query('select count(*)::int as n from t')).rows).toEqual([{ n: 3 }]);
		await expect(kept!.query('select 1')).rejects.toThrow('Transaction is closed');
		const n = await prepared.transaction(async (tx) => {
			await tx.query(insert, values(11));
			return (await tx.query<{ n: number }>('select count(*)::int as n from t')).rows[0].n;
		});
		expect(n).toBe(4);
	});

	it('holds a query back while a transaction is open, as PGlite does', async () => {
		const order: string[] = [];
		let release!: () => void;
		const gate = new Promise<void>((r) => (release = r));
		const tx = prepared.transaction(async (t) => {
			await t.query('update t set name = $1 where id = 1', ['in tx']);
			order.push('tx wrote');
			await gate;
			order.push('tx ends');
		});
		await new Promise((r) => setTimeout(r, 10));
		const outside = prepared.query<{ name: string }>('select name from t where id = 1').then((r) => {
			order.push(`outside read ${r.rows[0].name}`);
		});
		await new Promise((r) => setTimeout(r, 10));
		release();
		await Promise.all([tx, outside]);
		expect(order).toEqual(['tx wrote', 'tx ends', 'outside read in tx']);
	});

	it('refuses once the client is closed, as PGlite does', async () => {
		const closing = withPreparedStatements(await PGlite.create());
		await closing.query('select 1');
		await closing.close();
		const own = await PGlite.create();
		await own.close();
		const expected = await own.query('select 1').catch((e: Error) => e.message);
		await expect(closing.query('select 1')).rejects.toThrow(expected as string);
	});

	it(`keeps at most ${STATEMENTS_KEPT} prepared statements, the least recently used closed first`, async () => {
		const count = async () =>
			(await prepared.query<{ n: number }>('select count(*)::int as n from pg_prepared_statements')).rows[0]
				.n;
		for (let i = 0; i < STATEMENTS_KEPT + 50; i++)
			expect((await prepared.query(`select $1::int + ${i} as v`, [1])).rows).toEqual([{ v: i + 1 }]);
		expect(await count()).toBe(STATEMENTS_KEPT);
		// A closed statement is prepared again when its text comes back.
		expect((await prepared.query('select $1::int + 0 as v', [5])).rows).toEqual([{ v: 5 }]);
	});
});
