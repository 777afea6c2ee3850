import fs from 'node:fs';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { drizzle as drizzlePglite, type PgliteDatabase } from 'drizzle-orm/pglite';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { drizzle as drizzlePg, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import { migrate as migratePg } from 'drizzle-orm/node-postgres/migrator';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import pg from 'pg';
import { env } from '$lib/server/env';
import * as schema from './schema';
import { lockDataDir, releaseLock } from './lock';
import { tryExclusive, withLock } from './exclusive';
import { withPreparedStatements } from './pglite-statements';

export { schema };
type Schema = typeof schema;

type Rows<T> = { rows: T[] };
/** What both drivers answer to a raw `execute`: at least the rows. */
export interface RowsResult extends PgQueryResultHKT {
	type: Rows<this['row']>;
}
/** The app's Drizzle handle: the query API the embedded (PGlite) and PostgreSQL drivers share. */
export type DB = PgDatabase<RowsResult, Schema>;
export type Tx = Parameters<Parameters<DB['transaction']>[0]>[0];
export type DbKind = 'pglite' | 'postgres';

/** An open database, by driver, so each is migrated by drizzle's own migrator for it. */
type Opened =
	| { kind: 'pglite'; db: PgliteDatabase<Schema>; close: () => Promise<void>; pool: null }
	| { kind: 'postgres'; db: NodePgDatabase<Schema>; close: () => Promise<void>; pool: pg.Pool };
/** `pool` is the server's connection pool (null on the embedded database), for ./exclusive.ts. */
type Handle = { db: DB; kind: DbKind; close: () => Promise<void>; pool: pg.Pool | null };

export function dataDir() {
	return env().DATA_DIR;
}

/**
 * drizzle/ (written by `npm run db:generate`), resolved from the working directory like flows/:
 * the server runs from the project folder (`npm start`, `node build`).
 */
export function migrationsDir() {
	return path.resolve('drizzle');
}

// Every PGlite query runs as a named prepared statement (./pglite-statements.ts).
async function openPglite(dir: string): Promise<Opened> {
	if (dir.startsWith('memory://')) {
		const client = withPreparedStatements(await PGlite.create());
		return { db: drizzlePglite({ client, schema }), kind: 'pglite', close: () => client.close(), pool: null };
	}
	const pgdata = path.resolve(dir, 'pgdata');
	fs.mkdirSync(path.dirname(pgdata), { recursive: true });
	const lockFile = `${pgdata}.lock`;
	lockDataDir(lockFile);
	try {
		const client = withPreparedStatements(await PGlite.create(pgdata));
		const close = async () => {
			await client.close();
			releaseLock(lockFile);
		};
		return { db: drizzlePglite({ client, schema }), kind: 'pglite', close, pool: null };
	} catch (e) {
		releaseLock(lockFile);
		throw e;
	}
}

function openPostgres(url: string): Opened {
	const pool = new pg.Pool({ connectionString: url, max: env().DATABASE_POOL_SIZE });
	// An idle connection the server ends (a restart, an administrator, a dropped database) is
	// reported here; the pool replaces it. Without a listener it would end the whole process.
	pool.on('error', (e) => console.error(`[db] an idle PostgreSQL connection ended: ${e.message}`));
	return { db: drizzlePg({ client: pool, schema }), kind: 'postgres', close: () => pool.end(), pool };
}

/** Applies drizzle/'s migrations not yet applied, with the migrator of the database's driver. */
async function migrateDb(opened: Opened) {
	const config = { migrationsFolder: migrationsDir() };
	if (opened.kind === 'pglite') await migratePglite(opened.db, config);
	else await migratePg(opened.db, config);
}

/** Opens and migrates a database: DATABASE_URL wins, else PGlite in DATA_DIR ('memory://' for tests). */
export async function openDatabase(): Promise<Handle> {
	const url = env().DATABASE_URL;
	const opened = url ? openPostgres(url) : await openPglite(dataDir());
	try {
		// Processes starting together on one server migrate one after the other (./exclusive.ts).
		await withLock(opened.pool, 'migrate', () => migrateDb(opened));
	} catch (e) {
		await opened.close();
		throw e;
	}
	return opened;
}

// One database per process, kept on globalThis so that Vite's HMR does not open the folder twice.
const g = globalThis as unknown as { __tidemarkDb?: Promise<Handle> };

export function getHandle(): Promise<Handle> {
	g.__tidemarkDb ??= openDatabase();
	return g.__tidemarkDb;
}

export async function getDb(): Promise<DB> {
	return (await getHandle()).db;
}

export async function closeDb() {
	const handle = g.__tidemarkDb;
	g.__tidemarkDb = undefined;
	if (handle) await (await handle).close();
}

/** Work that one process at a time may do, waiting for its turn (./exclusive.ts). */
export async function oneAtATime<T>(name: string, fn: () => Promise<T>): Promise<T> {
	return withLock((await getHandle()).pool, name, fn);
}

/** Work that one process at a time may do, skipped while another process does it (./exclusive.ts). */
export async function unlessRunningElsewhere<T>(name: string, fn: () => Promise<T>) {
	return tryExclusive((await getHandle()).pool, name, fn);
}
