import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as runs from '$lib/server/runs/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as photos from '$lib/server/photos/queries';
import * as settings from '$lib/server/settings/queries';
import { getDb } from '$lib/server/db';
import { reachedInOtherRun } from '$lib/server/runs/data-secure';
import { stepsHtmlForVersion } from '$lib/markdown/steps';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const run = await runs.get(event.params.id);
	if (!run) error(404, { message: 'No run with this id. Runs are started from a job.' });
	const [job, runPhotos, reachedBefore, offline] = await Promise.all([
		jobs.get(run.jobId),
		photos.listForRun(run.id),
		reachedInOtherRun(await getDb(), run),
		settings.getOffline()
	]);
	if (!job) error(404, { message: 'The job of this run is missing.' });
	return {
		run,
		// Rendered and sanitised here, so the run page ships no markdown parser or sanitiser.
		html: stepsHtmlForVersion(run.flow.versionId, run.flow.definition),
		photos: runPhotos,
		queueWarnHours: offline.queueWarnHours,
		job: {
			id: job.id,
			jobNumber: jobs.formatJobNumber(job.number),
			maker: job.maker,
			model: job.model,
			customerName: job.customer.name,
			dataFirst: job.dataFirst,
			dataOutcome: job.dataOutcome,
			/** Another run of this job proved the data reachable (data first holds risky steps here too). */
			dataReachedBefore: reachedBefore
		}
	};
};
