import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import * as catalogue from '$lib/server/symptoms/queries';
import { answer, badRequest, readJson } from '$lib/server/http';
import { listQueryFrom, makeJobIntake } from '$lib/schemas/job';
import type { JobCreatedResponse } from '$lib/jobs/api-types';
import type { RequestHandler } from './$types';

/** GET /api/jobs?q=&status=&technician=&sort=&dir=&page=&size= — unknown values fall back to defaults. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	const list = await jobs.list(listQueryFrom(event.url.searchParams));
	return json(list);
};

/** POST /api/jobs — the intake as JSON, validated by the intake form's own schema. */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = makeJobIntake((await catalogue.offered()).map((s) => s.code)).safeParse(read.body);
	if (!parsed.success) return badRequest(parsed.error);
	return answer(async () => {
		const job = await jobs.create(user.id, parsed.data);
		const body: JobCreatedResponse = {
			id: job.id,
			number: job.number,
			jobNumber: jobs.formatJobNumber(job.number)
		};
		return json(body, { status: 201, headers: { location: `/api/jobs/${job.id}` } });
	});
};
