import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as runs from '$lib/server/runs/queries';
import { answer, badRequestFirst, readJson } from '$lib/server/http';
import { runListQuery, runStartInput, type RunListResponse, type RunStartedResponse } from '$lib/schemas/run';
import type { RequestHandler } from './$types';

export type { RunListResponse, RunStartedResponse };

/** GET /api/runs?jobId= — the runs of one job, newest first. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	const parsed = runListQuery.safeParse({ jobId: event.url.searchParams.get('jobId') ?? '' });
	if (!parsed.success) return badRequestFirst(parsed.error);
	return json({ runs: await runs.listForJob(parsed.data.jobId) } satisfies RunListResponse);
};

/** POST /api/runs { jobId, flowId } — starts a run of the flow's current published version. */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = runStartInput.safeParse(read.body);
	if (!parsed.success) return badRequestFirst(parsed.error);
	return answer(async () => {
		const run = await runs.start(parsed.data.jobId, parsed.data.flowId, user);
		const body: RunStartedResponse = {
			id: run.id,
			currentStep: run.currentStep,
			flowVersionId: run.flowVersionId
		};
		return json(body, { status: 201, headers: { location: `/api/runs/${run.id}` } });
	});
};
