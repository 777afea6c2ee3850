import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, fixed4, insightsEndpoint } from '$lib/server/insights/endpoint';
import type { VerdictsResponse } from '$lib/insights/types';

export type { VerdictsResponse };

const answer = insightsEndpoint({
	compute: (filters): Promise<VerdictsResponse> => insights.verdicts(filters),
	tables: {
		verdicts: (data) =>
			csv('verdicts', data.rows, [
				{ header: 'flow', value: (r) => r.flowId },
				{ header: 'version', value: (r) => r.version ?? 'all' },
				{ header: 'verdict', value: (r) => r.verdictCode },
				{ header: 'verdict_title', value: (r) => r.verdictTitle },
				{ header: 'count', value: (r) => r.count },
				{ header: 'completed_runs', value: (r) => r.runs },
				{ header: 'share', value: (r) => fixed4(r.share) },
				{ header: 'wilson95_lower', value: (r) => fixed4(r.lower) },
				{ header: 'wilson95_upper', value: (r) => fixed4(r.upper) }
			])
	}
});

/** Verdict frequency per flow (and version when one is chosen) with Wilson 95 % intervals. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	return answer(event.url);
};
