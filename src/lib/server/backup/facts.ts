/**
 * Facts read from a database copy (or a snapshot of the server) with plain SQL, so the same code
 * serves PGlite and node-postgres: the tables and their row counts, the migration level and the
 * photo keys the attachments name.
 */
import { tagOfHash, type MigrationLevel } from './manifest';

export type Query = (sql: string) => Promise<Record<string, unknown>[]>;

const ident = (name: string) => `"${name.replaceAll('"', '""')}"`;

/** Every table of the app and drizzle's migration record, as "table" or "schema.table". */
export async function tables(q: Query): Promise<{ name: string; sql: string }[]> {
	const rows = await q(
		`select schemaname as s, tablename as t from pg_tables where schemaname in ('public', 'drizzle') order by 1, 2`
	);
	return rows.map((r) => {
		const s = String(r.s);
		const t = String(r.t);
		return { name: s === 'public' ? t : `${s}.${t}`, sql: `${ident(s)}.${ident(t)}` };
	});
}

export async function rowCounts(q: Query): Promise<Record<string, number>> {
	const counts: Record<string, number> = {};
	for (const t of await tables(q)) {
		const [row] = await q(`select count(*)::int as n from ${t.sql}`);
		counts[t.name] = Number(row.n);
	}
	return counts;
}

export async function migrationLevel(q: Query): Promise<MigrationLevel> {
	const [exists] = await q(`select to_regclass('drizzle.__drizzle_migrations') is not null as ok`);
	if (!exists.ok) return { applied: 0, latestMillis: 0, latestHash: null, latestTag: null };
	const rows = await q(
		`select hash, created_at::text as at from drizzle.__drizzle_migrations order by created_at`
	);
	const last = rows.at(-1);
	const latestHash = last ? String(last.hash) : null;
	return {
		applied: rows.length,
		latestMillis: last ? Number(last.at) : 0,
		latestHash,
		latestTag: tagOfHash(latestHash)
	};
}

/** Every blob key the attachments name (original, display size, thumbnail), each once, sorted. */
export async function photoKeys(q: Query): Promise<string[]> {
	const [exists] = await q(`select to_regclass('public.attachments') is not null as ok`);
	if (!exists.ok) return [];
	const rows = await q(
		`select k from (select original_key as k from attachments union select display_key from attachments
		 union select thumb_key from attachments) keys order by k`
	);
	return rows.map((r) => String(r.k));
}
