import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import { recordDataOutcome } from '$lib/server/jobs/data-outcome';
import { answer, badRequest, readJson } from '$lib/server/http';
import { dataOutcomeInput } from '$lib/schemas/data-outcome';
import type { RequestHandler } from './$types';

/**
 * PUT /api/jobs/:id/data with `{ outcome, note, runId? }`: what became of the customer's data
 * (backed up, customer declined, not possible). Answers the job as GET /api/jobs/:id does; a
 * data-first run's held steps open at once.
 */
export const PUT: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = dataOutcomeInput.safeParse(read.body);
	if (!parsed.success) return badRequest(parsed.error, parsed.error.issues[0]?.message);
	return answer(async () => {
		await recordDataOutcome(event.params.id, parsed.data, user.id);
		return json(await jobs.get(event.params.id));
	});
};
