import { beforeAll, describe, expect, it } from 'vitest';
import type { Handle } from '@sveltejs/kit';
import { getDb } from '$lib/server/db';
import * as staff from '$lib/server/staff/queries';
import { authHandle } from '$lib/server/auth';
import { userHandle } from '$lib/server/hooks/user';
import { requireRole, requireUser } from '$lib/server/guards';
import { absorb, chain, makeEvent, quietAuthLog, type Jar } from '$lib/server/testing/events';
import { actions as staffActions } from '../../routes/(app)/staff/+page.server';
import { caches, clearAll } from './caches';

const PASSWORD = 'tide-pool-lantern-9';

// Counts how often Auth.js is asked to read a token: a request answered from the token cache does not ask.
let tokenReads = 0;
const countReads: Handle = ({ event, resolve }) => {
	const auth = event.locals.auth;
	event.locals.auth = () => {
		tokenReads++;
		return auth();
	};
	return resolve(event);
};
const hooks = chain(authHandle, countReads, userHandle);

async function member(email: string, role: 'technician' | 'lead') {
	return staff.create(null, {
		name: 'Maren Quayle',
		email,
		role,
		password: PASSWORD,
		mustChangePassword: false
	});
}

/** Signs in through Auth.js's credentials endpoint, as a browser's form post would. */
async function signIn(email: string, address: string): Promise<Jar> {
	const jar: Jar = new Map();
	const body = new URLSearchParams({ email, password: PASSWORD, callbackUrl: '/' });
	const event = makeEvent('/auth/callback/credentials', { method: 'POST', body, jar, address });
	absorb(jar, await hooks({ event, resolve: async () => new Response() }));
	return jar;
}

/** One request through the hooks; returns the event, with locals.user as the hooks left it. */
async function request(jar: Jar, path: string, init: Parameters<typeof makeEvent>[1] = {}) {
	const event = makeEvent(path, { ...init, jar: new Map(jar) });
	await hooks({ event, resolve: async () => new Response() });
	return event;
}

/** What a lead-only page's guard answers: 'allowed', or the status it throws (303 to sign-in, 403). */
async function leadPage(jar: Jar) {
	const event = await request(jar, '/settings', { routeId: '/(app)/settings' });
	try {
		requireRole(event, 'lead');
		return 'allowed';
	} catch (e) {
		return (e as { status: number }).status;
	}
}

async function staffAction(lead: Jar, action: 'role' | 'disabled', form: Record<string, string>) {
	const event = await request(lead, `/staff?/${action}`, {
		method: 'POST',
		body: new URLSearchParams(form),
		routeId: '/(app)/staff'
	});
	await staffActions[action](event as never);
}

beforeAll(async () => {
	quietAuthLog(); // the refused sign-in of a disabled user
	await getDb();
});

describe('a lead’s change to a user counts at that user’s next request, caches warm or not', () => {
	it('a demoted lead is signed out at once, and signing in again gives the lower role', async () => {
		const lead = await member('harbour.lead@shop.test', 'lead');
		const other = await member('second.lead@shop.test', 'lead');
		const leadJar = await signIn(lead.email, '203.0.113.10');
		let jar = await signIn(other.email, '203.0.113.11');

		// Two requests: the second is answered from the token and signed-in user caches.
		expect(await leadPage(jar)).toBe('allowed');
		const reads = tokenReads;
		expect(await leadPage(jar)).toBe('allowed');
		expect(tokenReads).toBe(reads);

		await staffAction(leadJar, 'role', { id: other.id, role: 'technician' });
		expect((await staff.findById(other.id))?.role).toBe('technician');
		expect(await leadPage(jar)).toBe(303);

		jar = await signIn(other.email, '203.0.113.12');
		expect(await leadPage(jar)).toBe(403);
		expect(requireUser(await request(jar, '/')).role).toBe('technician');
	});

	it('a disabled user is signed out at once and cannot sign in again', async () => {
		const lead = await member('tideway.lead@shop.test', 'lead');
		const tech = await member('bench.tech@shop.test', 'technician');
		const leadJar = await signIn(lead.email, '203.0.113.20');
		const jar = await signIn(tech.email, '203.0.113.21');
		expect((await request(jar, '/')).locals.user?.id).toBe(tech.id);
		expect((await request(jar, '/')).locals.user?.id).toBe(tech.id);

		await staffAction(leadJar, 'disabled', { id: tech.id, disabled: 'true' });
		expect((await staff.findById(tech.id))?.disabled).toBe(true);
		expect((await request(jar, '/')).locals.user).toBeNull();
		expect((await request(await signIn(tech.email, '203.0.113.22'), '/')).locals.user).toBeNull();
	});
});

describe('the cache list', () => {
	it('names each cache once, with what it keeps and its freshness rule', () => {
		expect(new Set(caches.map((c) => c.name)).size).toBe(caches.length);
		for (const c of caches) {
			expect(c.keeps.length).toBeGreaterThan(10);
			expect(c.fresh.length).toBeGreaterThan(10);
		}
	});

	it('clearAll() empties them: a remembered token is read again', async () => {
		const tech = await member('clear.all@shop.test', 'technician');
		const jar = await signIn(tech.email, '203.0.113.30');
		await request(jar, '/');
		const reads = tokenReads;
		await request(jar, '/');
		expect(tokenReads).toBe(reads);
		clearAll();
		expect((await request(jar, '/')).locals.user?.id).toBe(tech.id);
		expect(tokenReads).toBe(reads + 1);
	});
});
