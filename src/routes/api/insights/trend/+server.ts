import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, insightsEndpoint } from '$lib/server/insights/endpoint';
import type { TrendResponse, TrendWeek } from '$lib/insights/types';

export type { TrendResponse };

const answer = insightsEndpoint({
	compute: (filters): Promise<TrendResponse> => insights.trend(filters),
	tables: {
		weeks: (data) =>
			csv<TrendWeek>('trend', data.weeks, [
				{ header: 'week', value: (w) => w.week },
				{ header: 'jobs', value: (w) => w.jobs },
				{ header: 'runs', value: (w) => w.runs },
				{ header: 'abandoned', value: (w) => w.abandoned },
				...data.verdictCodes.map((code) => ({
					header: code,
					value: (w: TrendWeek) => w.verdicts[code] ?? 0
				}))
			])
	}
});

/** Finished runs, distinct jobs and each verdict per ISO week (Monday, UTC). */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	return answer(event.url);
};
