// Calls any route entry in process, through the real hooks (Auth.js, the user hook, the id check),
// as a given identity: no cookie, a forged one, or a real session of a technician, senior or lead.
import { isActionFailure, isHttpError, isRedirect, type RequestEvent } from '@sveltejs/kit';
import { encode } from '@auth/core/jwt';
import { sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { authHandle } from '$lib/server/auth';
import { userHandle } from '$lib/server/hooks/user';
import { paramsHandle } from '$lib/server/hooks/params';
import { absorb, chain, makeEvent, type Jar } from '$lib/server/testing/events';
import { FLOW, PASSWORD, type Member, type World } from '$lib/server/testing/world';
import type { Entry } from './routes';

const modules = import.meta.glob('/src/routes/**/+{page.server,layout.server,server}.ts');
const hooks = chain(authHandle, userHandle, paramsHandle);

export type Identity = 'anonymous' | 'forged' | 'technician' | 'senior' | 'lead';
export const identities: Identity[] = ['anonymous', 'forged', 'technician', 'senior', 'lead'];

export type Outcome = { status: number; location?: string; error?: unknown };

let address = 0;
/** A fresh client address per call, so the customer link's per-address limit never interferes. */
export function nextAddress() {
	address += 1;
	return `10.${(address >> 16) & 255}.${(address >> 8) & 255}.${address & 255}`;
}

/** Signs in through Auth.js's credentials endpoint and returns the cookie jar holding the session. */
export async function signInJar(email: string, password = PASSWORD): Promise<Jar> {
	const jar: Jar = new Map();
	const body = new URLSearchParams({ email, password, callbackUrl: '/' });
	const event = makeEvent('/auth/callback/credentials', {
		method: 'POST',
		body,
		jar,
		address: nextAddress()
	});
	const res = await hooks({ event, resolve: async () => new Response() });
	absorb(jar, res);
	if (![...jar.keys()].some((k) => k.includes('session-token')))
		throw new Error(`sign-in failed for ${email}`);
	return jar;
}

/** A well-formed session token for the lead, encrypted with a secret that is not the server's. */
export async function forgedJar(lead: Member): Promise<Jar> {
	const token = await encode({
		token: { sub: lead.id, role: 'lead', gen: 0, name: lead.name, email: lead.email },
		secret: 'not-the-server-secret-not-the-server-secret',
		salt: 'authjs.session-token'
	});
	return new Map([['authjs.session-token', token]]);
}

/** The concrete path and params for a route id, with the world's real ids. */
export function pathFor(routeId: string, w: World, override: Record<string, string> = {}) {
	const params: Record<string, string> = {};
	const parts: string[] = [];
	const segments = routeId.split('/').filter(Boolean);
	segments.forEach((seg, i) => {
		if (/^\(.*\)$/.test(seg)) return;
		const m = /^\[(\w+)\]$/.exec(seg);
		if (!m) return parts.push(seg);
		const ids: Record<string, string> = {
			jobs: w.jobId,
			runs: w.runId,
			photos: w.photoId,
			outbox: w.mailId,
			flows: FLOW
		};
		const others: Record<string, string> = {
			draftId: w.draftId,
			version: '1',
			size: 'thumb',
			token: w.token,
			action: 'submit'
		};
		const value = override[m[1]] ?? (m[1] === 'id' ? ids[segments[i - 1]] : others[m[1]]);
		if (!value) throw new Error(`no value for ${seg} in ${routeId}`);
		params[m[1]] = value;
		parts.push(encodeURIComponent(value));
	});
	return { path: `/${parts.join('/')}`, params };
}

export function isMutation(entry: Entry) {
	return entry.kind === 'action' || (entry.kind === 'method' && entry.name !== 'GET');
}

/** Runs one entry's handler with this event, turning what it returns or throws into an outcome. */
async function invoke(entry: Entry, event: RequestEvent): Promise<Outcome> {
	const mod = (await modules[`/src/routes/${entry.file.split('\\').join('/')}`]()) as Record<string, never>;
	const loadEvent = Object.assign(event, {
		parent: async () => ({}),
		depends: () => {},
		untrack: <T>(fn: () => T) => fn()
	});
	try {
		const fn =
			entry.kind === 'action'
				? (mod.actions as Record<string, (e: unknown) => unknown>)[entry.name]
				: entry.kind === 'method'
					? (mod[entry.name] as (e: unknown) => unknown)
					: (mod.load as (e: unknown) => unknown);
		const result = await fn(loadEvent);
		if (result instanceof Response) return { status: result.status };
		if (isActionFailure(result)) return { status: result.status };
		return { status: 200 };
	} catch (e) {
		return outcomeOf(e);
	}
}

function outcomeOf(e: unknown): Outcome {
	if (isRedirect(e)) return { status: e.status, location: e.location };
	if (isHttpError(e)) return { status: e.status };
	return { status: 500, error: e };
}

export type CallInit = {
	jar?: Jar;
	body?: BodyInit | null;
	contentType?: string;
	query?: string;
	/** Route parameters to use instead of the world's (the path follows them). */
	params?: Record<string, string>;
};

/** Calls an entry through the hooks as the holder of `jar`. */
export async function call(entry: Entry, w: World, init: CallInit = {}): Promise<Outcome> {
	const { path, params } = pathFor(entry.routeId, w, init.params);
	const method = entry.kind === 'method' ? entry.name : entry.kind === 'action' ? 'POST' : 'GET';
	const headers: Record<string, string> = {};
	let body = init.body;
	if (method !== 'GET' && method !== 'DELETE') {
		if (body === undefined) body = entry.kind === 'action' ? '' : '{}';
		headers['content-type'] =
			init.contentType ??
			(entry.kind === 'action' ? 'application/x-www-form-urlencoded' : 'application/json');
		if (init.contentType === 'multipart') delete headers['content-type'];
	} else body = undefined;
	const url = `${path}${entry.kind === 'action' ? `?/${entry.name}` : ''}${init.query ?? ''}`;
	const event = makeEvent(url, {
		method,
		body,
		headers,
		jar: new Map(init.jar ?? []),
		params,
		routeId: entry.routeId,
		address: nextAddress()
	});
	let outcome: Outcome = { status: 0 };
	try {
		const res = await hooks({
			event,
			resolve: async (e) => {
				outcome = await invoke(entry, e);
				return new Response(null);
			}
		});
		if (outcome.status === 0)
			outcome = { status: res.status, location: res.headers.get('location') ?? undefined };
	} catch (e) {
		outcome = outcomeOf(e);
	}
	return outcome;
}

/** Refused for lack of identity or role: 401, 403, or a page's redirect to the sign-in form. */
export function denied(o: Outcome) {
	return (
		o.status === 401 ||
		o.status === 403 ||
		(o.status >= 300 && o.status < 400 && !!o.location?.startsWith('/signin'))
	);
}

/** A digest of every table's rows: equal before and after means the request changed nothing stored. */
export async function fingerprint(): Promise<string> {
	const db = await getDb();
	const tables = (await db.execute(
		sql`select table_name as t from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by 1`
	)) as unknown as { rows: { t: string }[] };
	const parts = tables.rows.map(
		({ t }) =>
			sql`select ${t} as t, md5(coalesce(string_agg(x::text, '|' order by x::text), '')) as h from ${sql.identifier(t)} x`
	);
	const rows = (await db.execute(sql.join(parts, sql` union all `))) as unknown as {
		rows: { t: string; h: string }[];
	};
	return rows.rows.map((r) => `${r.t}:${r.h}`).join(',');
}
