import { beforeAll, describe, expect, it } from 'vitest';
import { hasRole } from '$lib/roles';
import { buildWorld, type World } from '$lib/server/testing/world';
import type { Jar } from '$lib/server/testing/events';
import { access, type Access } from './access';
import { discoverEntries, pagesWithoutServer, type Entry } from './routes';
import { quietAuthLog } from '$lib/server/testing/events';
import {
	call,
	denied,
	fingerprint,
	forgedJar,
	identities,
	isMutation,
	signInJar,
	type Identity
} from './harness';

// The authorization matrix: every route entry (page load, layout load, form action, API method)
// × anonymous / forged cookie / technician / senior / lead, through the real hooks, with real ids.
// Expected access comes from access.ts alone. No answer may be a 5xx, and a refused mutation must
// leave every table as it was.

const discovered = discoverEntries();
// Entries that end what later calls need run last: removing the photo, signing out.
const last = (e: Entry) => (e.name === 'DELETE' ? 1 : 0) + (e.routeId === '/(auth)/signout' ? 1 : 0);
const entries = [...discovered].sort((a, b) => last(a) - last(b));

let w: World;
const jars = {} as Record<Identity, Jar>;

async function signInAll() {
	jars.anonymous = new Map();
	jars.forged = await forgedJar(w.lead);
	jars.technician = await signInJar(w.tech.email);
	jars.senior = await signInJar(w.senior.email);
	jars.lead = await signInJar(w.lead.email);
}

beforeAll(async () => {
	quietAuthLog();
	w = await buildWorld();
	await signInAll();
}, 120_000);

// 5xx answers that are the route's documented reply in the test setup, not a fault.
const documented5xx: Record<string, number> = {
	'/api/payments/webhook POST': 503 // payments are not configured in the specs (no STRIPE_SECRET_KEY)
};

function expectedAllowed(a: Access, who: Identity) {
	if (a === 'public' || a === 'token') return true;
	if (who === 'anonymous' || who === 'forged') return false;
	return hasRole(who, a);
}

describe('authorization matrix', () => {
	it('knows every route entry, and only those (add a new route to access.ts)', () => {
		const missing = discovered.map((e) => e.key).filter((k) => !(k in access));
		const stale = Object.keys(access).filter((k) => !discovered.some((e) => e.key === k));
		expect(missing, 'route entries with no expected access in src/lib/server/security/access.ts').toEqual([]);
		expect(stale, 'access.ts names entries that no longer exist').toEqual([]);
		expect(pagesWithoutServer(), 'pages with no +page.server.ts are not covered by the matrix').toEqual([]);
		expect(discovered.length).toBeGreaterThan(80);
	});

	it.each(entries.map((e) => [e.key, e] as const))('%s', async (_key, entry) => {
		const expected = access[entry.key];
		expect(expected, `${entry.key} is missing from access.ts`).toBeDefined();
		const seen: string[] = [];
		const wrong: string[] = [];
		for (const who of identities) {
			const mutation = isMutation(entry);
			const before = mutation ? await fingerprint() : '';
			const o = await call(entry, w, { jar: jars[who] });
			seen.push(`${who}:${o.status}`);
			if (o.status >= 500 && o.status !== documented5xx[entry.key])
				wrong.push(`${who} got ${o.status}: ${String((o.error as Error)?.stack ?? o.error)}`);
			const allowed = !denied(o);
			if (allowed !== expectedAllowed(expected, who))
				wrong.push(
					`${who} was ${allowed ? 'let in' : 'refused'} (${o.status} ${o.location ?? ''}); expected ${expected}`
				);
			if (mutation && (!allowed || o.status >= 400)) {
				const after = await fingerprint();
				if (after !== before) wrong.push(`${who}'s refused ${entry.key} (${o.status}) changed stored data`);
			}
			if (entry.routeId === '/(auth)/signout') await signInAll();
		}
		expect(wrong, seen.join(' ')).toEqual([]);
	});
});
