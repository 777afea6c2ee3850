import { isHttpError, isRedirect } from '@sveltejs/kit';
import { describe, expect, it } from 'vitest';
import { requireRole, requireUser } from './guards';

/**
 * Behavioural authorization coverage: every route module under src/routes is imported, and every
 * exported load, action and API handler is called with an anonymous event. Each must refuse —
 * 401/403 for the API, a redirect to sign-in for pages — however it is written, except the public
 * entry points below. The event answers nothing useful (no body, no cookies, no parent data), so
 * a handler that touches anything before its guard fails here rather than leaking later.
 */
const publicAllowList: Record<string, string> = {
	'/(auth)/signin/+page.server.ts': 'the sign-in form itself',
	'/(auth)/signout/+page.server.ts': 'clears whatever session the cookie holds',
	'/api/health/+server.ts': 'liveness for monitors and the start-up benchmark; no data',
	'/api/payments/webhook/+server.ts': "authenticated by the payment service's signature",
	'/r/[token]/+page.server.ts': "the customer's report: authenticated by the link's token",
	'/r/[token]/photos/[id]/[size]/+server.ts': "its photos: authenticated by the link's token"
};

const modules = import.meta.glob<Record<string, unknown>>([
	'/src/routes/**/+page.server.ts',
	'/src/routes/**/+layout.server.ts',
	'/src/routes/**/+server.ts'
]);
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'];
const ANY_ID = '00000000-0000-4000-8000-000000000000';

/** `/src/routes/(app)/jobs/[id]/+page.server.ts` → route id `/(app)/jobs/[id]`, file key `/(app)/jobs/[id]/+page.server.ts`. */
function describeFile(file: string) {
	const key = file.replace(/^\/src\/routes/, '');
	const routeId = key.replace(/\/\+(page|layout)\.server\.ts$|\/\+server\.ts$/, '') || '/';
	const params = Object.fromEntries(
		[...routeId.matchAll(/\[(?:\.\.\.)?(\w+)(?:=\w+)?\]/g)].map((m) => [m[1], ANY_ID])
	);
	const path = routeId
		.replace(/\/\([^)]+\)/g, '')
		.replace(/\[(?:\.\.\.)?(\w+)(?:=\w+)?\]/g, ANY_ID)
		.replace(/^$/, '/');
	return { key, routeId, params, path };
}

function anonymousEvent(file: string, method: string) {
	const { routeId, params, path } = describeFile(file);
	const url = new URL(`http://tidemark.test${path}`);
	const nothing = () => {
		throw new Error('touched the request before its guard');
	};
	return {
		locals: { user: null } as unknown as App.Locals,
		url,
		params,
		route: { id: routeId },
		request: new Request(url, method === 'GET' ? { method } : { method, body: '{}' }),
		cookies: { get: () => undefined, getAll: () => [], set: nothing, delete: nothing, serialize: nothing },
		fetch: nothing,
		getClientAddress: () => '192.0.2.1',
		parent: nothing,
		depends: () => {},
		untrack: <T>(fn: () => T) => fn(),
		setHeaders: nothing,
		platform: undefined,
		isDataRequest: false,
		isSubRequest: false,
		tracing: { enabled: false, root: undefined, current: undefined }
	};
}

/** 'refused' when the handler threw the guard's answer; otherwise what it did instead. */
async function outcome(handler: (event: unknown) => unknown, event: ReturnType<typeof anonymousEvent>) {
	try {
		await handler(event);
		return 'answered without a guard';
	} catch (e) {
		if (isRedirect(e) && e.location.startsWith('/signin')) return 'refused';
		if (isHttpError(e) && (e.status === 401 || e.status === 403)) return 'refused';
		return `threw before refusing: ${e instanceof Error ? e.message : JSON.stringify(e)}`;
	}
}

type Entry = { file: string; name: string; call: (m: Record<string, unknown>) => unknown };

async function entryPoints(): Promise<Entry[]> {
	const out: Entry[] = [];
	for (const [file, load] of Object.entries(modules)) {
		const mod = await load();
		for (const name of ['load', ...METHODS])
			if (typeof mod[name] === 'function') out.push({ file, name, call: (m) => m[name] });
		const actions = mod.actions as Record<string, unknown> | undefined;
		for (const name of Object.keys(actions ?? {}))
			out.push({ file, name: `action ${name}`, call: () => actions![name] });
	}
	return out;
}

describe('authorization coverage (behavioural)', () => {
	it('finds the route modules and their handlers', async () => {
		const entries = await entryPoints();
		expect(Object.keys(modules).length).toBeGreaterThan(20);
		expect(entries.map((e) => `${e.file} ${e.name}`)).toContain(
			'/src/routes/(app)/staff/+page.server.ts load'
		);
		expect(entries.some((e) => e.name.startsWith('action '))).toBe(true);
	});

	it('every load, action and API handler refuses an anonymous caller (except the public allow-list)', async () => {
		const failures: string[] = [];
		for (const entry of await entryPoints()) {
			const { key } = describeFile(entry.file);
			if (publicAllowList[key]) continue;
			const mod = await modules[entry.file]();
			const method = METHODS.includes(entry.name)
				? entry.name
				: entry.name.startsWith('action')
					? 'POST'
					: 'GET';
			const result = await outcome(
				entry.call(mod) as (e: unknown) => unknown,
				anonymousEvent(entry.file, method)
			);
			if (result !== 'refused') failures.push(`${key} ${entry.name}: ${result}`);
		}
		expect(failures).toEqual([]);
	});

	it('every allow-listed file still exists', () => {
		const keys = Object.keys(modules).map((f) => describeFile(f).key);
		for (const file of Object.keys(publicAllowList)) expect(keys).toContain(file);
	});

	it('would catch a handler that works before its guard, and one with no guard at all', async () => {
		const event = anonymousEvent('/src/routes/(app)/jobs/+page.server.ts', 'GET');
		const late = async (e: typeof event) => {
			await e.parent();
			requireUser(e);
		};
		expect(await outcome(late as never, event)).toMatch(/^threw before refusing/);
		expect(await outcome((() => ({ jobs: [] })) as never, event)).toBe('answered without a guard');
		expect(await outcome(((e: typeof event) => requireUser(e)) as never, event)).toBe('refused');
	});
});

describe('guards', () => {
	const event = (user: App.Locals['user'], routeId = '/(app)/staff') => ({
		locals: { user } as App.Locals,
		url: new URL('http://x.test/staff?tab=1'),
		route: { id: routeId }
	});
	const tech = { id: '1', name: 'T', email: 't@x.test', role: 'technician' as const };
	const lead = { ...tech, role: 'lead' as const };

	it('sends a signed-out visitor of a page to sign-in, keeping where they were going', () => {
		expect(() => requireUser(event(null))).toThrow(
			expect.objectContaining({ status: 303, location: '/signin?next=%2Fstaff%3Ftab%3D1' })
		);
	});
	it('answers 401 to a signed-out API caller', () => {
		expect(() => requireUser(event(null, '/api/jobs'))).toThrow(expect.objectContaining({ status: 401 }));
	});
	it('answers 403 below the needed role and passes at or above it (roles are cumulative)', () => {
		expect(() => requireRole(event(tech), 'lead')).toThrow(expect.objectContaining({ status: 403 }));
		expect(requireRole(event(lead), 'senior')).toBe(lead);
		expect(requireRole(event(tech), 'technician')).toBe(tech);
	});
});
