import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import { recordEvent } from '$lib/server/runs/commit';
import { answer, badRequest, readJson } from '$lib/server/runs/http';
import { runEventInput } from '$lib/schemas/run';
import type { RunEventResult } from '$lib/runs/types';
import type { RequestHandler } from './$types';

/** 200: the event was applied (or replayed: the same key again returns the same body). */
export type RunEventResponse = RunEventResult;

/**
 * POST /api/runs/:id/events { type: ANSWER|MEASURE|BACK, stepId, outcome?|value?, idempotencyKey, notes? }
 * 400 bad input or an outcome/reading the pinned flow version refuses; 409 (with `state`) when the
 * step is no longer current or the run has finished; 404 for an unknown run.
 */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = runEventInput.safeParse(read.body);
	if (!parsed.success) return badRequest(parsed.error);
	return answer(async () => {
		const result = await recordEvent(event.params.id, parsed.data, user);
		return json(result satisfies RunEventResponse);
	});
};
