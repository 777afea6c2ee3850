const WINDOW_MS = 15 * 60 * 1000;
const MAX_FAILURES = 10;

// Failed sign-ins, counted per e-mail and per client address in fixed windows that start with the
// first failure. In memory: one shop, one process. Every way in (the sign-in page and Auth.js's own
// credentials endpoint) counts here, because the check sits in the credentials provider.
type Window = { failures: number; until: number };
const byEmail = new Map<string, Window>();
const byAddress = new Map<string, Window>();
const MAX_KEYS = 10_000;

let now = () => Date.now();

/** Tests move time forward without waiting; pass nothing to go back to the real clock. */
export function setSignInClock(clock?: () => number) {
	now = clock ?? (() => Date.now());
}

function current(map: Map<string, Window>, key: string) {
	const w = map.get(key);
	if (w && w.until <= now()) {
		map.delete(key);
		return undefined;
	}
	return w;
}

function penalise(map: Map<string, Window>, key: string) {
	const w = current(map, key);
	if (w) w.failures += 1;
	else {
		// A flood of invented e-mails must not grow the map without end: drop the oldest window.
		if (map.size >= MAX_KEYS) map.delete(map.keys().next().value!);
		map.set(key, { failures: 1, until: now() + WINDOW_MS });
	}
}

/** Seconds to wait before another attempt, or 0 when the caller may try. */
export async function signInBlockedFor(email: string, address: string) {
	const blocked = [current(byEmail, email), current(byAddress, address)].filter(
		(w): w is Window => !!w && w.failures >= MAX_FAILURES
	);
	if (blocked.length === 0) return 0;
	return Math.ceil((Math.max(...blocked.map((w) => w.until)) - now()) / 1000);
}

export async function recordFailedSignIn(email: string, address: string) {
	penalise(byEmail, email);
	penalise(byAddress, address);
}

export async function clearFailedSignIns(email: string) {
	byEmail.delete(email);
}

/** Whole minutes, rounded up, for the refusal message. */
export function waitMessage(seconds: number) {
	const minutes = Math.max(1, Math.ceil(seconds / 60));
	return `Too many failed sign-ins. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`;
}

export const signInLimits = { windowMinutes: WINDOW_MS / 60_000, maxFailures: MAX_FAILURES };
