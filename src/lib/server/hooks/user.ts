import type { Cookies, Handle } from '@sveltejs/kit';
import * as staff from '$lib/server/staff/queries';

// Auth.js answers `locals.auth()` by decrypting the session token and encrypting a fresh one, a
// visible share of every request in the server's CPU profile. The user id a token carries never changes, so
// it is remembered per token for a minute; the token's own expiry still counts (see `until`), and
// the cookie is refreshed by Auth.js whenever the cache misses.
const SESSION_CACHE_MS = 60_000;
const SESSION_CACHE_SIZE = 5000;
const sessions = new Map<string, { userId: string | null; gen: number; until: number }>();

/** Forgets every remembered token (caches.ts). */
export function forgetSessionTokens() {
	sessions.clear();
}

/** The session cookie(s) Auth.js wrote (chunked tokens come as `.0`, `.1`, …), or '' when none. */
function sessionToken(cookies: Cookies) {
	return cookies
		.getAll()
		.filter((c) => c.name.includes('authjs.session-token'))
		.map((c) => `${c.name}=${c.value}`)
		.sort()
		.join(';');
}

type TokenFacts = { userId: string | null; gen: number };

async function sessionOf(event: Parameters<Handle>[0]['event']): Promise<TokenFacts | null> {
	const token = sessionToken(event.cookies);
	if (!token) return null;
	const now = Date.now();
	const hit = sessions.get(token);
	if (hit && hit.until > now) return hit;
	const session = await event.locals.auth();
	const userId = session?.user?.id ?? null;
	// A token from before session generations existed carries none: it no longer counts.
	const gen = typeof session?.user?.gen === 'number' ? session.user.gen : -1;
	const expires = session?.expires ? Date.parse(session.expires) : now;
	if (sessions.size >= SESSION_CACHE_SIZE) sessions.delete(sessions.keys().next().value!);
	sessions.set(token, { userId, gen, until: Math.min(now + SESSION_CACHE_MS, expires) });
	return { userId, gen };
}

/**
 * Fills locals.user from the session. The user row is looked up on every request (cached for two
 * seconds and cleared by every staff change, sign-out included), and the token's session generation
 * must equal the user's: sign-out, a password change, a role change or disabling bumps it, so every
 * earlier token stops working at once (OWASP ASVS 4.0 V3.3). The token cache above keeps only what
 * the token says, never whether it still counts. This hook only fills locals; every server entry
 * point still calls requireUser / requireRole.
 */
export const userHandle: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	const facts = await sessionOf(event);
	if (facts?.userId) {
		const user = await staff.findSignedIn(facts.userId);
		if (user && !user.disabled && user.sessionGeneration === facts.gen) {
			event.locals.user = { id: user.id, name: user.name, email: user.email, role: user.role };
		}
	}
	return resolve(event);
};
