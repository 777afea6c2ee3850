import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import { recordEvent } from '$lib/server/runs/commit';
import { answer, badRequestFirst, readJson } from '$lib/server/http';
import { runEventInput } from '$lib/schemas/run';
import type { RunEventResult } from '$lib/runs/types';
import type { RequestHandler } from './$types';

/**
 * 200: the event was applied (or replayed: the same key with the same body returns the same answer);
 * 422 when the key was used for a different body.
 */
export type RunEventResponse = RunEventResult;

/**
 * POST /api/runs/:id/events { type: ANSWER|MEASURE|BACK, stepId, outcome?|value?, idempotencyKey, notes? }
 * 400 bad input or an outcome/reading the pinned flow version refuses; 409 (with `state`) when the
 * step is no longer current or the run has finished; 404 for an unknown run; 422 for a reused key.
 */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = runEventInput.safeParse(read.body);
	if (!parsed.success) return badRequestFirst(parsed.error);
	return answer(async () =>
		json((await recordEvent(event.params.id, parsed.data, user)) satisfies RunEventResponse)
	);
};
