import crypto from 'node:crypto';
import { and, eq, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { requestKeys } from '$lib/server/db/schema';

/** JSON with object keys sorted, so the same body hashes the same whatever order its fields came in. */
function canonical(value: unknown): string {
	if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
	if (value && typeof value === 'object') {
		const entries = Object.entries(value)
			.filter(([, v]) => v !== undefined)
			.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
		return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(',')}}`;
	}
	return JSON.stringify(value);
}

export function bodyHash(body: unknown) {
	return crypto.createHash('sha256').update(canonical(body)).digest('hex');
}

export type Claim =
	{ status: 'new'; release: () => Promise<void> } | { status: 'same' } | { status: 'different' };

export const keyReusedMessage =
	'This idempotency key was already used for a different request. Send a new key for a new request; repeat a request only with exactly the same body.';

/**
 * Records which body an idempotency key was first used with. 'same' lets the route replay its first
 * answer; 'different' is refused with 422 (as payment services do). A 'new' claim is released when
 * the request is refused, so the key is only held by a request that was applied.
 */
export async function claim(scope: string, key: string, body: unknown): Promise<Claim> {
	const db = await getDb();
	const hash = bodyHash(body);
	const inserted = await db
		.insert(requestKeys)
		.values({ scope, key, bodyHash: hash })
		.onConflictDoNothing()
		.returning({ key: requestKeys.key });
	if (inserted.length > 0) {
		return {
			status: 'new',
			release: async () => {
				await db
					.delete(requestKeys)
					.where(and(eq(requestKeys.scope, scope), eq(requestKeys.key, key), eq(requestKeys.bodyHash, hash)));
			}
		};
	}
	const [row] = await db
		.select({ bodyHash: requestKeys.bodyHash })
		.from(requestKeys)
		.where(and(eq(requestKeys.scope, scope), eq(requestKeys.key, key)));
	// Released between our insert and this read: the first request was refused, so this one is new.
	if (!row) return claim(scope, key, body);
	return { status: row.bodyHash === hash ? 'same' : 'different' };
}

/** For tests and the crash check: how many keys a scope holds. */
export async function countKeys(scope: string) {
	const db = await getDb();
	const [{ n }] = await db
		.select({ n: sql<number>`count(*)::int` })
		.from(requestKeys)
		.where(eq(requestKeys.scope, scope));
	return n;
}
