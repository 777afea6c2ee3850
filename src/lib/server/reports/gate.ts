/**
 * The door of every /r/[token] handler: a per-address rate limit, then the token. Unknown,
 * malformed, expired and revoked tokens get the same 404 with the same words, so a visitor
 * learns nothing about which it was.
 */
import { error, type RequestEvent } from '@sveltejs/kit';
import type { ReportLink } from '$lib/server/db/schema/quotes';
import { rateStore } from '$lib/server/rate-store';
import { resolve } from './links';

export const INVALID_LINK = 'This link is no longer valid.';

// Requests per address: generous for a customer reading, approving and paying; far too few to
// guess a 256-bit token, and a burst of bad tokens costs more than good ones. Counted in the
// database on a PostgreSQL server (every process, across restarts), in memory on the embedded one.
const requests = rateStore({ keyPrefix: 'report-req', points: 120, duration: 60 });
const misses = rateStore({ keyPrefix: 'report-miss', points: 20, duration: 15 * 60 });

type GateEvent = Pick<RequestEvent, 'params' | 'getClientAddress'>;

export async function openLink(event: GateEvent): Promise<ReportLink> {
	const address = event.getClientAddress();
	const [req, miss] = await Promise.all([requests.get(address), misses.get(address)]);
	if ((req && req.points >= 120) || (miss && miss.points >= 20))
		error(429, { message: 'Too many requests from this address. Please wait a few minutes and try again.' });
	await requests.add(address);
	const link = await resolve(String(event.params.token ?? ''));
	if (!link) {
		await misses.add(address);
		error(404, { message: INVALID_LINK });
	}
	return link;
}
