import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as runs from '$lib/server/runs/queries';
import type { RunDetail } from '$lib/runs/types';
import type { ApiError } from '$lib/server/http';
import type { RequestHandler } from './$types';

export type RunResponse = RunDetail;

/** GET /api/runs/:id — the run, its pinned flow definition and every stored step. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	const run = await runs.get(event.params.id);
	if (!run)
		return json({ message: 'No run with this id.', code: 'not-found' } satisfies ApiError, { status: 404 });
	return json(run satisfies RunResponse);
};
