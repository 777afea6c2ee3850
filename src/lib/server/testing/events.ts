// Builds RequestEvents for specs that drive hooks, pages and endpoints in process, with a cookie jar
// that carries Set-Cookie from one request to the next as a browser would.
import type { Cookies, Handle, RequestEvent } from '@sveltejs/kit';

export type Jar = Map<string, string>;

export function cookieHeader(jar: Jar) {
	return [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
}

function cookiesFor(jar: Jar): Cookies {
	return {
		get: (name) => jar.get(name),
		getAll: () => [...jar].map(([name, value]) => ({ name, value })),
		set: (name, value, opts) => {
			if (value === '' || opts?.maxAge === 0) jar.delete(name);
			else jar.set(name, value);
		},
		delete: (name) => void jar.delete(name),
		serialize: (name, value) => `${name}=${value}`
	} as Cookies;
}

/** Reads Set-Cookie headers of a Response into the jar. */
export function absorb(jar: Jar, response: Response) {
	for (const line of response.headers.getSetCookie()) {
		const [pair, ...attrs] = line.split(';');
		const at = pair.indexOf('=');
		const name = pair.slice(0, at).trim();
		const value = pair.slice(at + 1).trim();
		const expired = attrs.some(
			(a) => /max-age=0\b/i.test(a.trim()) || /expires=thu, 01 jan 1970/i.test(a.trim())
		);
		if (!value || expired) jar.delete(name);
		else jar.set(name, value);
	}
}

export type EventInit = RequestInit & {
	jar?: Jar;
	address?: string;
	params?: Record<string, string>;
	routeId?: string | null;
	locals?: Partial<App.Locals>;
};

export const ORIGIN = 'http://shop.test';

export function makeEvent(pathname: string, init: EventInit = {}): RequestEvent {
	const { jar = new Map(), address = '192.0.2.1', params = {}, routeId = null, locals = {}, ...req } = init;
	const url = new URL(pathname, ORIGIN);
	const headers = new Headers(req.headers);
	headers.set('host', url.host);
	if (!headers.has('origin') && req.method && req.method !== 'GET') headers.set('origin', ORIGIN);
	if (jar.size) headers.set('cookie', cookieHeader(jar));
	const request = new Request(url, { ...req, headers });
	const event = {
		url,
		request,
		params,
		route: { id: routeId },
		locals: { user: null, ...locals },
		cookies: cookiesFor(jar),
		getClientAddress: () => address,
		setHeaders: () => {},
		isDataRequest: false,
		isSubRequest: false,
		isRemoteRequest: false,
		platform: undefined,
		fetch: globalThis.fetch,
		tracing: { enabled: false, root: {}, current: {} }
	};
	return event as unknown as RequestEvent;
}

/** Hooks in order, as `sequence` runs them (which needs SvelteKit's request store, absent here). */
export function chain(...handles: Handle[]): Handle {
	return ({ event, resolve }) =>
		handles.reduceRight<(e: RequestEvent) => Promise<Response>>(
			(next, h) => async (e) => h({ event: e, resolve: next }),
			async (e) => resolve(e)
		)(event);
}

/** Auth.js logs every undecryptable (forged) token as an error; the suite makes hundreds on purpose. */
export function quietAuthLog() {
	const original = console.error;
	console.error = (...args: unknown[]) => {
		if (typeof args[0] === 'string' && args[0].includes('[auth]')) return;
		original(...args);
	};
}
