import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, fixed4, insightsEndpoint } from '$lib/server/insights/endpoint';
import type { AbandonedResponse } from '$lib/insights/types';

export type { AbandonedResponse };

const answer = insightsEndpoint({
	compute: (filters): Promise<AbandonedResponse> => insights.abandoned(filters),
	tables: {
		reasons: (data) =>
			csv('abandoned-reasons', data.reasons, [
				{ header: 'reason', value: (r) => r.reason },
				{ header: 'count', value: (r) => r.count },
				{ header: 'share_of_abandoned', value: (r) => fixed4(r.share) },
				{ header: 'most_common_step', value: (r) => r.commonStep }
			]),
		steps: (data) =>
			csv('abandoned-steps', data.steps, [
				{ header: 'flow', value: (r) => r.flowId },
				{ header: 'step', value: (r) => r.stepId },
				{ header: 'step_title', value: (r) => r.stepTitle },
				{ header: 'abandoned', value: (r) => r.count }
			])
	}
});

/** Abandoned runs: the reasons given and the steps they stopped at; CSV per table. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	return answer(event.url);
};
