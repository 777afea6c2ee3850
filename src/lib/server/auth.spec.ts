import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import * as staff from '$lib/server/staff/queries';
import { authHandle } from '$lib/server/auth';
import { userHandle } from '$lib/server/hooks/user';
import { setSignInClock } from '$lib/server/ratelimit';
import { makeEvent, absorb, chain, type Jar } from '$lib/server/testing/events';
import { actions as signInActions } from '../../routes/(auth)/signin/+page.server';
import { actions as signOutActions } from '../../routes/(auth)/signout/+page.server';
import { actions as accountActions } from '../../routes/(app)/account/+page.server';

const PASSWORD = 'harbour-lantern-42';
const handle = chain(authHandle, userHandle);

afterEach(() => setSignInClock());

async function member(email: string, role: 'technician' | 'senior' | 'lead' = 'technician') {
	return staff.create(null, {
		name: 'Tamsin Reedbank',
		email,
		role,
		password: PASSWORD,
		mustChangePassword: false
	});
}

/** The sign-in page's form action. Returns the status and, on success, the jar with the session. */
async function viaPage(email: string, password: string, address: string, jar: Jar = new Map()) {
	const body = new URLSearchParams({ email, password });
	const event = makeEvent('/signin', { method: 'POST', body, address, jar, routeId: '/(auth)/signin' });
	try {
		const result = await signInActions.default(event as never);
		const failed = result as { status: number; data: { form: { message?: string } } };
		return { status: failed.status, message: failed.data.form.message ?? '', jar };
	} catch (e) {
		const r = e as { status?: number; location?: string };
		if (r.status && r.location) return { status: r.status, message: '', jar };
		throw e;
	}
}

/**
 * Auth.js's own endpoint, as a script would use it. @auth/sveltekit turns Auth.js's CSRF token off
 * and leaves form posts to SvelteKit's origin check, which a script passes by sending the origin.
 */
async function viaEndpoint(email: string, password: string, address: string, jar: Jar = new Map()) {
	const body = new URLSearchParams({ email, password, callbackUrl: '/' });
	const event = makeEvent('/auth/callback/credentials', { method: 'POST', body, jar, address });
	const response = await handle({ event, resolve: async () => new Response() });
	absorb(jar, response);
	const location = response.headers.get('location') ?? '';
	// Auth.js signals a refused password with a redirect to the sign-in page carrying ?error=.
	const signedIn = response.status === 302 && !location.includes('error=');
	return {
		status: signedIn ? 200 : response.status === 302 ? 401 : response.status,
		body: await response.text(),
		jar
	};
}

/** Which user a request with this jar is signed in as, after the hooks ran. */
async function whoIs(jar: Jar) {
	const event = makeEvent('/', { jar: new Map(jar) });
	await handle({ event, resolve: async () => new Response() });
	return event.locals.user?.id ?? null;
}

async function refusals(email: string) {
	const db = await getDb();
	const rows = await db
		.select({ details: auditLog.details })
		.from(auditLog)
		.where(and(eq(auditLog.action, 'signin.refused'), sql`${auditLog.details} ->> 'email' = ${email}`));
	return rows.map((r) => r.details.reason);
}

beforeAll(async () => {
	await getDb();
});

describe('sign-in limit shared by the page and the credentials endpoint', () => {
	it('signs in on both paths with the right password, and refuses a wrong one on both', async () => {
		const m = await member('both.paths@shop.test');
		expect((await viaPage(m.email, PASSWORD, '198.51.100.1')).status).toBe(303);
		const direct = await viaEndpoint(m.email, PASSWORD, '198.51.100.1');
		expect(direct.status).toBe(200);
		expect(await whoIs(direct.jar)).toBe(m.id);
		expect((await viaPage(m.email, 'wrong-password', '198.51.100.1')).status).toBe(400);
		expect((await viaEndpoint(m.email, 'wrong-password', '198.51.100.1')).status).toBe(401);
		const audited = await refusals(m.email);
		expect(audited).toEqual(['wrong-password', 'wrong-password']);
		const db = await getDb();
		const all = await db.select({ details: auditLog.details }).from(auditLog);
		// The audit keeps who, from where and why; never a password, right or wrong.
		expect(JSON.stringify(all)).not.toContain(PASSWORD);
		expect(JSON.stringify(all)).not.toContain('"password"');
	});

	it('counts failures on either path against one budget per e-mail: 6 on the page + 4 direct, then both refuse', async () => {
		const m = await member('shared.budget@shop.test');
		for (let i = 0; i < 6; i++)
			expect((await viaPage(m.email, `guess-${i}`, `203.0.113.${i}`)).status).toBe(400);
		for (let i = 0; i < 4; i++)
			expect((await viaEndpoint(m.email, `guess-d${i}`, `203.0.113.${10 + i}`)).status).toBe(401);
		// Locked out: the right password no longer helps on either path, from a fresh address too.
		const page = await viaPage(m.email, PASSWORD, '203.0.113.50');
		expect(page.status).toBe(429);
		expect(page.message).toMatch(/^Too many failed sign-ins\. Try again in 15 minutes\.$/);
		const direct = await viaEndpoint(m.email, PASSWORD, '203.0.113.51');
		expect(direct.status).toBe(429);
		expect(direct.body).toBe(page.message);
		expect(await whoIs(direct.jar)).toBeNull();
		expect(await refusals(m.email)).toEqual([
			...Array(10).fill('wrong-password'),
			'rate-limited',
			'rate-limited'
		]);
	});

	it('counts failures per client address across e-mails and both paths', async () => {
		const m = await member('victim.address@shop.test');
		const address = '192.0.2.77';
		for (let i = 0; i < 6; i++) await viaPage(`nobody${i}@shop.test`, 'x', address);
		for (let i = 0; i < 5; i++) await viaEndpoint(`nobody-d${i}@shop.test`, 'x', address);
		expect((await viaPage(m.email, PASSWORD, address)).status).toBe(429);
		expect((await viaEndpoint(m.email, PASSWORD, address)).status).toBe(429);
		// Another address may still sign this member in: the e-mail itself has no failures.
		expect((await viaEndpoint(m.email, PASSWORD, '192.0.2.78')).status).toBe(200);
	});

	it('lifts the lock after the 15-minute window', async () => {
		const m = await member('window.lifts@shop.test');
		const start = Date.now();
		setSignInClock(() => start);
		for (let i = 0; i < 10; i++) await viaEndpoint(m.email, `guess-${i}`, `198.18.0.${i}`);
		expect((await viaPage(m.email, PASSWORD, '198.18.1.1')).status).toBe(429);
		setSignInClock(() => start + 14 * 60_000);
		const later = await viaPage(m.email, PASSWORD, '198.18.1.1');
		expect(later.status).toBe(429);
		expect(later.message).toBe('Too many failed sign-ins. Try again in 1 minute.');
		setSignInClock(() => start + 15 * 60_000 + 1000);
		expect((await viaEndpoint(m.email, PASSWORD, '198.18.1.2')).status).toBe(200);
		expect((await viaPage(m.email, PASSWORD, '198.18.1.3')).status).toBe(303);
	});
});

describe('sign-out and staff changes end earlier sessions', () => {
	async function signedIn(email: string) {
		const { jar } = await viaEndpoint(email, PASSWORD, '100.64.0.1');
		return jar;
	}

	it('a token copied before sign-out no longer works after it, on any device', async () => {
		const m = await member('signs.out@shop.test');
		const jar = await signedIn(m.email);
		const laptop = await signedIn(m.email);
		const copy = new Map(jar);
		expect(await whoIs(copy)).toBe(m.id);
		const event = makeEvent('/signout', { method: 'POST', jar, locals: {} });
		await handle({ event, resolve: async () => new Response() });
		await expect(signOutActions.default(event as never)).rejects.toMatchObject({ status: 302 });
		expect(await whoIs(copy)).toBeNull();
		expect(await whoIs(laptop)).toBeNull();
		// Signing in again works and gives a token that counts.
		expect(await whoIs(await signedIn(m.email))).toBe(m.id);
	});

	it('a role change, disabling and a reset password end earlier tokens', async () => {
		const lead = await member('lead.changes@shop.test', 'lead');
		const m = await member('changed@shop.test');
		let copy = await signedIn(m.email);
		await staff.changeRole(lead.id, m.id, 'senior');
		expect(await whoIs(copy)).toBeNull();
		copy = await signedIn(m.email);
		await staff.setDisabled(lead.id, m.id, true);
		expect(await whoIs(copy)).toBeNull();
		await staff.setDisabled(lead.id, m.id, false);
		expect(await whoIs(copy)).toBeNull();
		copy = await signedIn(m.email);
		await staff.resetPassword(lead.id, m.id, 'temporary-pass-1');
		expect(await whoIs(copy)).toBeNull();
	});

	it('changing your own password keeps this browser signed in and ends every other copy', async () => {
		const m = await member('own.password@shop.test');
		const jar = await signedIn(m.email);
		const copy = new Map(jar);
		const body = new URLSearchParams({
			current: PASSWORD,
			password: 'new-harbour-lantern-7',
			confirm: 'new-harbour-lantern-7'
		});
		const event = makeEvent('/account?/password', { method: 'POST', body, jar, address: '100.64.0.2' });
		await handle({ event, resolve: async () => new Response() });
		const result = (await accountActions.password(event as never)) as { form: { message?: string } };
		expect(result.form.message).toBe('Your password is changed.');
		expect(await whoIs(copy)).toBeNull();
		expect(await whoIs(jar)).toBe(m.id);
	});
});
