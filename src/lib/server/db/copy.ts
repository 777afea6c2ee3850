/**
 * Copies every row of one Tidemark database into another, for the move from the embedded database
 * to a PostgreSQL server (`npm run db:copy -- <postgres-url>`). Both sides are migrated by the same
 * code first, so their tables agree; the target must be empty. Rows travel as JSON text made and
 * read by PostgreSQL itself (row_to_json → json_populate_recordset), so every type — timestamps to
 * the microsecond, numerics, arrays, jsonb, bytea — arrives exactly as it was. The whole copy is one
 * transaction on the target: it lands completely or not at all.
 */
import { sql, type SQL } from 'drizzle-orm';
import type { DB, Tx } from './index';

type Db = DB | Tx;

async function rows<T>(db: Db, query: SQL): Promise<T[]> {
	return ((await db.execute(query)) as unknown as { rows: T[] }).rows;
}

export class CopyRefused extends Error {}

/** The app's tables, each after every table it refers to (a table's reference to itself aside). */
export async function tablesInOrder(db: Db): Promise<string[]> {
	const tables = (
		await rows<{ name: string }>(
			db,
			sql`select c.relname as name from pg_class c join pg_namespace n on n.oid = c.relnamespace
				where n.nspname = 'public' and c.relkind in ('r', 'p') order by c.relname`
		)
	).map((r) => r.name);
	const edges = await rows<{ child: string; parent: string }>(
		db,
		sql`select c.relname as child, p.relname as parent from pg_constraint k
			join pg_class c on c.oid = k.conrelid join pg_class p on p.oid = k.confrelid
			where k.contype = 'f' and k.connamespace = 'public'::regnamespace and k.conrelid <> k.confrelid`
	);
	const parents = new Map(tables.map((t) => [t, new Set<string>()]));
	for (const e of edges) parents.get(e.child)?.add(e.parent);
	const ordered: string[] = [];
	const placed = new Set<string>();
	while (ordered.length < tables.length) {
		const ready = tables.filter((t) => !placed.has(t) && [...parents.get(t)!].every((p) => placed.has(p)));
		if (!ready.length) {
			const left = tables.filter((t) => !placed.has(t));
			throw new CopyRefused(`Circular foreign keys between ${left.join(', ')}: no order to copy them in.`);
		}
		for (const t of ready) {
			ordered.push(t);
			placed.add(t);
		}
	}
	return ordered;
}

/** Rows of every table, by name; for the target's emptiness check and the final comparison. */
export async function rowCounts(db: Db, tables: string[]): Promise<Record<string, number>> {
	const counts: Record<string, number> = {};
	for (const t of tables) {
		const [r] = await rows<{ n: string }>(db, sql`select count(*)::text as n from ${sql.identifier(t)}`);
		counts[t] = Number(r.n);
	}
	return counts;
}

/**
 * The rows of a table in an order the target accepts: by primary key, except that a table whose
 * rows refer to other rows of it (a flow version based on an earlier one) sends each referenced
 * row before the rows that refer to it.
 */
async function selectInOrder(db: Db, table: string): Promise<SQL> {
	const t = sql.identifier(table);
	const pk = await rows<{ col: string }>(
		db,
		sql`select a.attname as col from pg_index i
			join pg_attribute a on a.attrelid = i.indrelid and a.attnum = any(i.indkey)
			where i.indrelid = ${`public.${table}`}::regclass and i.indisprimary order by a.attnum`
	);
	const byKey = pk.length
		? sql.join(
				pk.map((p) => sql`t.${sql.identifier(p.col)}`),
				sql`, `
			)
		: sql`t.ctid`;
	const [self] = await rows<{ col: string; ref: string }>(
		db,
		sql`select a.attname as col, pa.attname as ref from pg_constraint k
			join pg_attribute a on a.attrelid = k.conrelid and a.attnum = k.conkey[1]
			join pg_attribute pa on pa.attrelid = k.confrelid and pa.attnum = k.confkey[1]
			where k.contype = 'f' and k.conrelid = ${`public.${table}`}::regclass
			and k.conrelid = k.confrelid and cardinality(k.conkey) = 1`
	);
	if (!self) return sql`select row_to_json(t)::text as j from ${t} t order by ${byKey}`;
	const col = sql.identifier(self.col);
	const ref = sql.identifier(self.ref);
	return sql`with recursive depth(ref, d) as (
			select ${ref}, 0 from ${t} where ${col} is null or ${col} = ${ref}
			union all select c.${ref}, depth.d + 1 from ${t} c join depth on c.${col} = depth.ref and c.${col} <> c.${ref}
		)
		select row_to_json(t)::text as j from ${t} t
		join (select ref, max(d) as d from depth group by ref) o on o.ref = t.${ref}
		order by o.d, ${byKey}`;
}

async function insertableColumns(db: Db, table: string) {
	const cols = await rows<{ name: string; always: boolean }>(
		db,
		sql`select column_name as name, identity_generation = 'ALWAYS' as always
			from information_schema.columns
			where table_schema = 'public' and table_name = ${table} and is_generated = 'NEVER'
			order by ordinal_position`
	);
	return { names: cols.map((c) => c.name), identityAlways: cols.some((c) => c.always) };
}

export type CopyReport = { table: string; source: number; target: number }[];

/**
 * Copies source into target (both open and migrated). Refuses a target with any row in it. Reads
 * with a cursor and writes in batches of at most `batchRows` rows or about 4 MB, whichever comes
 * first. Sequences (job numbers, bigserial ids) continue where the source's stood.
 */
export async function copyDatabase(
	source: DB,
	target: DB,
	opts: { batchRows?: number; log?: (line: string) => void } = {}
): Promise<CopyReport> {
	const batchRows = opts.batchRows ?? 500;
	const log = opts.log ?? (() => {});
	const tables = await tablesInOrder(source);
	const targetTables = await tablesInOrder(target);
	const missing = tables.filter((t) => !targetTables.includes(t));
	if (missing.length) throw new CopyRefused(`The target lacks the tables ${missing.join(', ')}.`);
	const already = Object.entries(await rowCounts(target, targetTables)).filter(([, n]) => n > 0);
	if (already.length) {
		throw new CopyRefused(
			`The target database is not empty (${already.map(([t, n]) => `${t}: ${n}`).join(', ')}). ` +
				'Copy into a new, empty database (createdb), never over one the app has already used.'
		);
	}

	await target.transaction(async (into) => {
		await source.transaction(async (from) => {
			for (const table of tables) {
				const { names, identityAlways } = await insertableColumns(into, table);
				const cols = sql.join(
					names.map((n) => sql.identifier(n)),
					sql`, `
				);
				const overriding = identityAlways ? sql`overriding system value` : sql``;
				const write = async (batch: string[]) => {
					const json = `[${batch.join(',')}]`;
					await into.execute(
						sql`insert into ${sql.identifier(table)} (${cols}) ${overriding}
							select ${cols} from json_populate_recordset(null::${sql.identifier(table)}, ${json}::json)`
					);
				};
				await from.execute(
					sql`declare tidemark_copy no scroll cursor for ${await selectInOrder(from, table)}`
				);
				let copied = 0;
				for (;;) {
					const fetched = await rows<{ j: string }>(
						from,
						sql`fetch forward ${sql.raw(String(batchRows))} from tidemark_copy`
					);
					if (!fetched.length) break;
					let batch: string[] = [];
					let size = 0;
					for (const { j } of fetched) {
						if (batch.length && size + j.length > 4_000_000) {
							await write(batch);
							batch = [];
							size = 0;
						}
						batch.push(j);
						size += j.length;
					}
					if (batch.length) await write(batch);
					copied += fetched.length;
				}
				await from.execute(sql`close tidemark_copy`);
				log(`${table}: ${copied} rows`);
			}
			const sequences = await rows<{ name: string; last: string | null; start: string }>(
				from,
				sql`select sequencename as name, last_value::text as last, start_value::text as start
					from pg_sequences where schemaname = 'public'`
			);
			for (const s of sequences) {
				const seq = `public.${s.name}`;
				if (s.last === null)
					await into.execute(sql`select setval(${seq}::regclass, ${s.start}::bigint, false)`);
				else await into.execute(sql`select setval(${seq}::regclass, ${s.last}::bigint, true)`);
			}
			log(`sequences: ${sequences.length} carried over`);
		});
	});

	const [from, to] = [await rowCounts(source, tables), await rowCounts(target, tables)];
	const report = tables.map((table) => ({ table, source: from[table], target: to[table] }));
	const wrong = report.filter((r) => r.source !== r.target);
	if (wrong.length) {
		throw new Error(
			`Row counts differ after the copy: ${wrong.map((r) => `${r.table} ${r.source} → ${r.target}`).join(', ')}.`
		);
	}
	return report;
}
