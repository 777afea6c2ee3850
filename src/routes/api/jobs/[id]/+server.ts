import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import { answer, badRequest, readJson, type Jsonify } from '$lib/server/http';
import { jobPatch } from '$lib/schemas/job';
import type { RequestHandler } from './$types';

export type JobResponse = Jsonify<jobs.JobDetail>;

export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	const job = await jobs.get(event.params.id);
	if (!job) error(404, { message: 'No job with this id.' });
	return json(job);
};

/**
 * PATCH /api/jobs/:id with one of `{ status, note? }`, `{ technicianId }` (null unassigns) or
 * `{ consentToOpen: true }`. Answers the job as GET does; 409 when the workflow forbids the move.
 */
export const PATCH: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = jobPatch.safeParse(read.body);
	if (!parsed.success) {
		return badRequest(
			parsed.error,
			'Send one change: { status, note? }, { technicianId } or { consentToOpen: true }.'
		);
	}
	const patch = parsed.data;
	const id = event.params.id;
	return answer(async () => {
		if ('status' in patch) await jobs.transition(id, patch.status, user.id, patch.note);
		else if ('technicianId' in patch) await jobs.assignTechnician(id, patch.technicianId, user.id);
		else await jobs.recordConsent(id, user.id);
		return json(await jobs.get(id));
	});
};
