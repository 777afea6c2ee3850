import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import {
	diagnosticsEnabled,
	eventLoopStats,
	resetEventLoopStats,
	type EventLoopStats
} from '$lib/server/diagnostics';
import type { RequestHandler } from './$types';

export type EventLoopResponse = EventLoopStats;

const off = () =>
	json({ message: 'Diagnostics are off (TIDEMARK_DIAGNOSTICS=1 turns them on).' }, { status: 404 });

/** GET /api/diagnostics/event-loop — event-loop delay since the last reset; lead only, env-gated. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	if (!diagnosticsEnabled()) return off();
	return json(eventLoopStats() satisfies EventLoopResponse);
};

/** POST /api/diagnostics/event-loop — starts a new measurement window. */
export const POST: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	if (!diagnosticsEnabled()) return off();
	resetEventLoopStats();
	return json(eventLoopStats() satisfies EventLoopResponse);
};
