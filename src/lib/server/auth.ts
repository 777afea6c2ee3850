import { SvelteKitAuth, CredentialsSignin } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import { isRedirect, type Handle, type RequestEvent } from '@sveltejs/kit';
import { z } from 'zod';
import * as staff from '$lib/server/staff/queries';
import { burnVerify, verifyPassword } from '$lib/server/passwords';
import { clearFailedSignIns, recordFailedSignIn, signInBlockedFor, waitMessage } from '$lib/server/ratelimit';
import { getDb } from '$lib/server/db';
import { record } from '$lib/server/audit';
import type { Role } from '$lib/roles';
import { env } from '$lib/server/env';

export class DisabledAccount extends CredentialsSignin {
	code = 'disabled';
}

/** Too many failed sign-ins for this e-mail or this address; the wait is left in locals.signInWait. */
export class TooManySignIns extends CredentialsSignin {
	code = 'rate-limited';
}

const credentials = z.object({ email: z.email(), password: z.string().min(1).max(200) });

function clientAddress(event: RequestEvent) {
	try {
		return event.getClientAddress();
	} catch {
		return 'unknown';
	}
}

/** A refused sign-in, for the audit log: who was tried, from where and why — never the password. */
async function auditRefusal(email: string, address: string, reason: string, userId?: string) {
	const db = await getDb();
	await record(db, {
		actorId: null,
		action: 'signin.refused',
		targetType: 'signin',
		targetId: userId ?? null,
		details: { email, address, reason }
	});
}

/**
 * Checks a password for one request. The sign-in limit is applied here, where the password is
 * checked, so the sign-in page and Auth.js's own POST /auth/callback/credentials share one budget
 * per e-mail and per client address.
 */
async function authorize(event: RequestEvent, raw: unknown) {
	const parsed = credentials.safeParse(raw);
	if (!parsed.success) return null;
	const email = parsed.data.email.trim().toLowerCase();
	const address = clientAddress(event);
	const wait = await signInBlockedFor(email, address);
	if (wait > 0) {
		event.locals.signInWait = wait;
		await auditRefusal(email, address, 'rate-limited');
		throw new TooManySignIns();
	}
	const user = await staff.findByEmail(email);
	const ok = user
		? await verifyPassword(user.passwordHash, parsed.data.password)
		: await burnVerify(parsed.data.password).then(() => false);
	if (!user || !ok) {
		await recordFailedSignIn(email, address);
		await auditRefusal(email, address, user ? 'wrong-password' : 'unknown-e-mail', user?.id);
		return null;
	}
	if (user.disabled) {
		await auditRefusal(email, address, 'disabled', user.id);
		throw new DisabledAccount();
	}
	await clearFailedSignIns(email);
	return {
		id: user.id,
		email: user.email,
		name: user.name,
		role: user.role,
		sessionGeneration: user.sessionGeneration
	};
}

const auth = SvelteKitAuth(async (event) => ({
	// Credentials only work with JWT sessions. The hook re-reads the user on every request and
	// compares the token's session generation with the user's, so a role change, a disabled account
	// or a sign-out ends every earlier token at once.
	session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
	// @auth/sveltekit ignores AUTH_TRUST_HOST in production builds; adapter-node sits behind ORIGIN.
	trustHost: true,
	secret: env().AUTH_SECRET,
	pages: { signIn: '/signin' },
	providers: [
		Credentials({
			credentials: { email: { type: 'email' }, password: { type: 'password' } },
			authorize: (raw) => authorize(event, raw)
		})
	],
	callbacks: {
		jwt({ token, user }) {
			if (user) {
				const u = user as { id: string; role: Role; sessionGeneration: number };
				token.sub = u.id;
				token.role = u.role;
				token.gen = u.sessionGeneration;
			}
			return token;
		},
		session({ session, token }) {
			session.user.id = token.sub!;
			session.user.role = token.role as Role;
			session.user.gen = typeof token.gen === 'number' ? token.gen : -1;
			return session;
		}
	}
}));

export const { signIn, signOut } = auth;

/**
 * Auth.js answers a refused credentials sign-in with a redirect to the sign-in page. A refusal for
 * too many failures is answered as the sign-in page answers it: 429 with the wait.
 */
export const authHandle: Handle = async (input) => {
	const response = await auth.handle(input);
	const { event } = input;
	if (event.url.pathname === '/auth/callback/credentials' && event.locals.signInWait) {
		const wait = event.locals.signInWait;
		return new Response(waitMessage(wait), {
			status: 429,
			headers: { 'content-type': 'text/plain; charset=utf-8', 'retry-after': String(wait) }
		});
	}
	return response;
};

/**
 * A password change ends every session of the member, this one too; signing in again here with the
 * new password gives this browser a fresh token while every other copy stays ended.
 */
export async function renewSession(event: RequestEvent, email: string, password: string) {
	const body = new URLSearchParams({ email, password, providerId: 'credentials', redirectTo: '/account' });
	const request = new Request(event.request.url, {
		method: 'POST',
		headers: { 'content-type': 'application/x-www-form-urlencoded', ...forwardedHeaders(event.request) },
		body
	});
	try {
		await signIn({ ...event, request });
	} catch (e) {
		// Success is thrown as a redirect after the new cookie is set on event.cookies.
		if (!isRedirect(e)) throw e;
	}
}

/** The headers Auth.js reads to build its own URLs and cookies, for a sign-in made inside an action. */
export function forwardedHeaders(request: Request) {
	const out: Record<string, string> = {};
	for (const name of [
		'cookie',
		'host',
		'origin',
		'referer',
		'x-forwarded-for',
		'x-forwarded-proto',
		'x-forwarded-host'
	]) {
		const value = request.headers.get(name);
		if (value) out[name] = value;
	}
	return out;
}
