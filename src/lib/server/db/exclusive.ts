/**
 * One process at a time, for work that several server processes on one PostgreSQL server would
 * otherwise each do: migrating and seeding at start (wait your turn) and background jobs such as a
 * scheduled backup or the demo's history fill (skip when another process is already at it). Both
 * hold a session-level advisory lock on a connection of their own for as long as the work runs, so
 * a process that dies releases it with its connection. The embedded database has one process (its
 * data folder is locked to it), so there the work just runs.
 */
import pg from 'pg';

/** The pool of the server database, or null on the embedded one. */
type Pool = pg.Pool | null;

const key = (name: string) => `tidemark:${name}`;

async function locked<T>(pool: Pool, name: string, wait: boolean, fn: () => Promise<T>) {
	if (!pool) return { ran: true as const, value: await fn() };
	// A connection outside the pool: the work itself uses the pool, and must not wait for the
	// connection that holds its lock (DATABASE_POOL_SIZE=1 would deadlock).
	const client = new pg.Client(pool.options);
	await client.connect();
	try {
		if (wait) await client.query('select pg_advisory_lock(hashtextextended($1, 0))', [key(name)]);
		else {
			const { rows } = await client.query<{ ok: boolean }>(
				'select pg_try_advisory_lock(hashtextextended($1, 0)) as ok',
				[key(name)]
			);
			if (!rows[0].ok) return { ran: false as const };
		}
		try {
			return { ran: true as const, value: await fn() };
		} finally {
			await client.query('select pg_advisory_unlock(hashtextextended($1, 0))', [key(name)]);
		}
	} finally {
		await client.end();
	}
}

/** Waits until no other process holds `name`, then runs `fn` holding it. */
export async function withLock<T>(pool: Pool, name: string, fn: () => Promise<T>): Promise<T> {
	const r = await locked(pool, name, true, fn);
	if (!r.ran) throw new Error('unreachable: a waiting lock always runs');
	return r.value;
}

/** Runs `fn` only if no other process holds `name` right now; `ran: false` when one does. */
export function tryExclusive<T>(pool: Pool, name: string, fn: () => Promise<T>) {
	return locked(pool, name, false, fn);
}
