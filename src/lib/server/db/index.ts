import fs from 'node:fs';
import path from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { drizzle as drizzlePglite, type PgliteDatabase } from 'drizzle-orm/pglite';
import { drizzle as drizzlePg } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from './schema';
import { migrations } from './migrations';
import { lockDataDir, releaseLock } from './lock';

export { schema };
/** The app's Drizzle handle. Typed as the PGlite flavour; the node-postgres one has the same query API. */
export type DB = PgliteDatabase<typeof schema>;
export type Tx = Parameters<Parameters<DB['transaction']>[0]>[0];
export type DbKind = 'pglite' | 'postgres';

type Handle = { db: DB; kind: DbKind; close: () => Promise<void> };

export function dataDir() {
	return process.env.DATA_DIR || './data';
}

async function openPglite(dir: string): Promise<Handle> {
	if (dir.startsWith('memory://')) {
		const client = await PGlite.create();
		return { db: drizzlePglite({ client, schema }), kind: 'pglite', close: () => client.close() };
	}
	const pgdata = path.resolve(dir, 'pgdata');
	fs.mkdirSync(path.dirname(pgdata), { recursive: true });
	const lockFile = `${pgdata}.lock`;
	lockDataDir(lockFile);
	try {
		const client = await PGlite.create(pgdata);
		const close = async () => {
			await client.close();
			releaseLock(lockFile);
		};
		return { db: drizzlePglite({ client, schema }), kind: 'pglite', close };
	} catch (e) {
		releaseLock(lockFile);
		throw e;
	}
}

function openPostgres(url: string): Handle {
	const pool = new pg.Pool({ connectionString: url, max: Number(process.env.DATABASE_POOL_SIZE ?? 10) });
	const db = drizzlePg({ client: pool, schema }) as unknown as DB;
	return { db, kind: 'postgres', close: () => pool.end() };
}

/** Applies the embedded drizzle/ migrations with the same call drizzle's own migrators make. */
export async function migrateDb(db: DB) {
	const d = db as unknown as {
		dialect: { migrate: (m: unknown, s: unknown, c: object) => Promise<void> };
		session: unknown;
	};
	await d.dialect.migrate(migrations, d.session, { migrationsFolder: '' });
}

/** Opens and migrates a database: DATABASE_URL wins, else PGlite in DATA_DIR ('memory://' for tests). */
export async function openDatabase(): Promise<Handle> {
	const url = process.env.DATABASE_URL;
	const handle = url ? openPostgres(url) : await openPglite(dataDir());
	await migrateDb(handle.db);
	return handle;
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
