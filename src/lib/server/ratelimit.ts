import { getHandle } from '$lib/server/db';
import { storeFor, type Count, type RateStore } from '$lib/server/rate-store';

const WINDOW_MS = 15 * 60 * 1000;
const MAX_FAILURES = 10;

// Failed sign-ins, counted per e-mail and per client address in fixed windows that start with the
// first failure. Every way in (the sign-in page and Auth.js's own credentials endpoint) counts here,
// because the check sits in the credentials provider. On a PostgreSQL server the counts live in the
// database (rate-store.ts), so several processes share them and a restart keeps them; on the
// embedded database (one process) in this process's memory.
const MAX_KEYS = 10_000;

let now = () => Date.now();

/** Tests move time forward without waiting (memory store); pass nothing to go back to the real clock. */
export function setSignInClock(clock?: () => number) {
	now = clock ?? (() => Date.now());
}

/** The embedded database's store: a map of windows, read against the (test-settable) clock. */
function memoryStore(): RateStore {
	const map = new Map<string, Count>();
	const current = (key: string) => {
		const w = map.get(key);
		if (w && w.until <= now()) {
			map.delete(key);
			return null;
		}
		return w ?? null;
	};
	return {
		kind: 'memory',
		get: async (key) => current(key),
		add: async (key, points = 1) => {
			const w = current(key);
			if (w) {
				w.points += points;
				return w;
			}
			// A flood of invented e-mails must not grow the map without end: drop the oldest window.
			if (map.size >= MAX_KEYS) map.delete(map.keys().next().value!);
			const fresh = { points, until: now() + WINDOW_MS };
			map.set(key, fresh);
			return fresh;
		},
		delete: async (key) => {
			map.delete(key);
		}
	};
}

let made: { handle: object; email: RateStore; address: RateStore } | null = null;

async function stores() {
	const handle = await getHandle();
	if (made?.handle !== handle) {
		const limit = (keyPrefix: string) =>
			handle.kind === 'pglite'
				? memoryStore()
				: storeFor(handle, { keyPrefix, points: MAX_FAILURES, duration: WINDOW_MS / 1000 });
		made = { handle, email: limit('signin-email'), address: limit('signin-address') };
	}
	return made;
}

/** Seconds to wait before another attempt, or 0 when the caller may try. */
export async function signInBlockedFor(email: string, address: string) {
	const { email: byEmail, address: byAddress } = await stores();
	const blocked = (await Promise.all([byEmail.get(email), byAddress.get(address)])).filter(
		(w): w is Count => !!w && w.points >= MAX_FAILURES
	);
	if (blocked.length === 0) return 0;
	const t = byEmail.kind === 'memory' ? now() : Date.now();
	return Math.max(1, Math.ceil((Math.max(...blocked.map((w) => w.until)) - t) / 1000));
}

export async function recordFailedSignIn(email: string, address: string) {
	const { email: byEmail, address: byAddress } = await stores();
	await Promise.all([byEmail.add(email), byAddress.add(address)]);
}

export async function clearFailedSignIns(email: string) {
	await (await stores()).email.delete(email);
}

/** Whole minutes, rounded up, for the refusal message. */
export function waitMessage(seconds: number) {
	const minutes = Math.max(1, Math.ceil(seconds / 60));
	return `Too many failed sign-ins. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`;
}

export const signInLimits = { windowMinutes: WINDOW_MS / 60_000, maxFailures: MAX_FAILURES };
