import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, fixed4, insightsEndpoint } from '$lib/server/insights/endpoint';
import type { AccuracyResponse } from '$lib/insights/types';

export type { AccuracyResponse };

const answer = insightsEndpoint({
	compute: (filters): Promise<AccuracyResponse> => insights.accuracy(filters),
	tables: {
		verdicts: (data) =>
			csv('verdict-accuracy', data.rows, [
				{ header: 'flow', value: (r) => r.flowId },
				{ header: 'verdict', value: (r) => r.verdictCode },
				{ header: 'completed_runs', value: (r) => r.completed },
				{ header: 'judged', value: (r) => r.judged },
				{ header: 'confirmed', value: (r) => r.confirmed },
				{ header: 'share_confirmed', value: (r) => fixed4(r.share) },
				{ header: 'wilson95_lower', value: (r) => fixed4(r.lower) },
				{ header: 'wilson95_upper', value: (r) => fixed4(r.upper) }
			]),
		overturned: (data) =>
			csv('overturned', data.overturned, [
				{ header: 'run', value: (r) => r.runId },
				{ header: 'job', value: (r) => r.jobId },
				{ header: 'flow', value: (r) => r.flowId },
				{ header: 'version', value: (r) => r.version },
				{ header: 'verdict', value: (r) => r.verdictCode },
				{ header: 'technician', value: (r) => r.technicianName },
				{ header: 'note', value: (r) => r.note },
				{ header: 'at', value: (r) => r.at }
			])
	}
});

/** Share of judged verdicts the repair confirmed, with intervals, and the overturned runs with notes. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	return answer(event.url);
};
