import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, parseFilters } from '$lib/server/insights/http';
import type { TrendResponse, TrendWeek } from '$lib/insights/types';

export type { TrendResponse };

/** Finished runs, distinct jobs and each verdict per ISO week (Monday, UTC). */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	const parsed = parseFilters(event.url);
	if (!parsed.ok) return parsed.response;
	const { filters } = parsed;
	const data = await insights.trend(filters);
	if (filters.format === 'csv')
		return csv<TrendWeek>('trend', data.weeks, [
			{ header: 'week', value: (w) => w.week },
			{ header: 'jobs', value: (w) => w.jobs },
			{ header: 'runs', value: (w) => w.runs },
			{ header: 'abandoned', value: (w) => w.abandoned },
			...data.verdictCodes.map((code) => ({ header: code, value: (w: TrendWeek) => w.verdicts[code] ?? 0 }))
		]);
	return json(data satisfies TrendResponse);
};
