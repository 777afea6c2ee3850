import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as runs from '$lib/server/runs/queries';
import { answer, badRequestFirst, readJson } from '$lib/server/http';
import { runAbandonInput, type RunAbandonedResponse } from '$lib/schemas/run';
import type { RequestHandler } from './$types';

export type { RunAbandonedResponse };

/** POST /api/runs/:id/abandon { reason } — stops a run under way; 409 once it has finished. */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = runAbandonInput.safeParse(read.body);
	if (!parsed.success) return badRequestFirst(parsed.error);
	return answer(async () => {
		const run = await runs.abandon(event.params.id, parsed.data.reason, user);
		return json({
			id: run.id,
			status: 'abandoned',
			abandonReason: run.abandonReason ?? ''
		} satisfies RunAbandonedResponse);
	});
};
