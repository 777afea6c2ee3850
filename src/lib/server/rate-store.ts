/**
 * Where rate-limit counters live. On a PostgreSQL server (DATABASE_URL) in the `rate_limits` table
 * through rate-limiter-flexible's drizzle store, so every process counts into the same window and
 * a restart forgets nothing; on the embedded database in the process's memory, because there is
 * only one process and a write per request would cost the single thread (docs/decisions/
 * 0014-rate-limits-in-the-database.md).
 */
import { RateLimiterDrizzle, RateLimiterMemory, type RateLimiterAbstract } from 'rate-limiter-flexible';
import { getHandle, type DbKind, type DB } from '$lib/server/db';
import { rateLimits } from '$lib/server/db/schema/ratelimits';

export type LimitOptions = { keyPrefix: string; points: number; duration: number };
/** What a limiter knows about one key: points used in the current window and when it ends. */
export type Count = { points: number; until: number };

export type RateStore = {
	kind: 'memory' | 'database';
	get(key: string): Promise<Count | null>;
	add(key: string, points?: number): Promise<Count>;
	delete(key: string): Promise<void>;
};

function wrap(kind: RateStore['kind'], limiter: RateLimiterAbstract): RateStore {
	const count = (r: { consumedPoints: number; msBeforeNext: number }) => ({
		points: r.consumedPoints,
		until: Date.now() + Math.max(0, r.msBeforeNext)
	});
	return {
		kind,
		get: async (key) => {
			const r = await limiter.get(key);
			return r ? count(r) : null;
		},
		add: async (key, points = 1) => count(await limiter.penalty(key, points)),
		delete: async (key) => {
			await limiter.delete(key);
		}
	};
}

/** A store for one database: its table on a server, the process's memory on the embedded one. */
export function storeFor(handle: { kind: DbKind; db: DB }, options: LimitOptions): RateStore {
	if (handle.kind === 'pglite') return wrap('memory', new RateLimiterMemory(options));
	return wrap(
		'database',
		new RateLimiterDrizzle({
			...options,
			storeClient: handle.db,
			schema: rateLimits,
			clearExpiredByTimeout: true
		})
	);
}

/**
 * A limiter that picks its store when first used, from the database the app opened (and again if
 * that handle changes: tests switch between PGlite and a server).
 */
export function rateStore(options: LimitOptions): RateStore {
	let made: { handle: object; store: RateStore } | null = null;
	const store = async () => {
		const handle = await getHandle();
		if (made?.handle !== handle) made = { handle, store: storeFor(handle, options) };
		return made.store;
	};
	return {
		get kind() {
			return made?.store.kind ?? 'memory';
		},
		get: async (key) => (await store()).get(key),
		add: async (key, points) => (await store()).add(key, points),
		delete: async (key) => (await store()).delete(key)
	};
}
