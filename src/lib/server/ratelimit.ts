import { RateLimiterMemory } from 'rate-limiter-flexible';

const WINDOW_SECONDS = 15 * 60;
const MAX_FAILURES = 10;

// Failed sign-ins, counted per e-mail and per client address. In memory: one shop, one process.
const byEmail = new RateLimiterMemory({
	keyPrefix: 'signin-email',
	points: MAX_FAILURES,
	duration: WINDOW_SECONDS
});
const byAddress = new RateLimiterMemory({
	keyPrefix: 'signin-ip',
	points: MAX_FAILURES,
	duration: WINDOW_SECONDS
});

/** Seconds to wait before another attempt, or 0 when the caller may try. */
export async function signInBlockedFor(email: string, address: string) {
	const [e, a] = await Promise.all([byEmail.get(email), byAddress.get(address)]);
	const blocked = [e, a].filter((r) => r && r.consumedPoints >= MAX_FAILURES);
	if (blocked.length === 0) return 0;
	return Math.ceil(Math.max(...blocked.map((r) => r!.msBeforeNext)) / 1000);
}

export async function recordFailedSignIn(email: string, address: string) {
	await Promise.all([byEmail.penalty(email, 1), byAddress.penalty(address, 1)]);
}

export async function clearFailedSignIns(email: string) {
	await byEmail.delete(email);
}

export const signInLimits = { windowMinutes: WINDOW_SECONDS / 60, maxFailures: MAX_FAILURES };
