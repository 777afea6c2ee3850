import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, insightsEndpoint } from '$lib/server/insights/endpoint';
import type { DurationsResponse } from '$lib/insights/types';

export type { DurationsResponse };

const answer = insightsEndpoint({
	compute: (filters): Promise<DurationsResponse> => insights.durations(filters),
	tables: {
		flows: (data) =>
			csv('time-to-verdict', data.flows, [
				{ header: 'flow', value: (r) => r.flowId },
				{ header: 'flow_title', value: (r) => r.flowTitle },
				{ header: 'completed_runs', value: (r) => r.runs },
				{ header: 'median_minutes', value: (r) => r.medianMinutes },
				{ header: 'p90_minutes', value: (r) => r.p90Minutes }
			]),
		steps: (data) =>
			csv('step-dwell', data.steps, [
				{ header: 'flow', value: (r) => r.flowId },
				{ header: 'step', value: (r) => r.stepId },
				{ header: 'step_title', value: (r) => r.stepTitle },
				{ header: 'answers', value: (r) => r.answers },
				{ header: 'median_minutes', value: (r) => r.medianMinutes },
				{ header: 'p90_minutes', value: (r) => r.p90Minutes }
			])
	}
});

/** Time to verdict per flow (median, p90) and time spent on each step; CSV per table. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	return answer(event.url);
};
