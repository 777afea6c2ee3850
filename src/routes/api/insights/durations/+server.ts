import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, parseFilters, unknownTable } from '$lib/server/insights/http';
import type { DurationsResponse } from '$lib/insights/types';

export type { DurationsResponse };

const tables = ['flows', 'steps'] as const;

/** Time to verdict per flow (median, p90) and time spent on each step; CSV per table. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	const parsed = parseFilters(event.url);
	if (!parsed.ok) return parsed.response;
	const { filters } = parsed;
	if (filters.table && !tables.includes(filters.table as (typeof tables)[number]))
		return unknownTable(tables);
	const data = await insights.durations(filters);
	if (filters.format === 'csv' && filters.table === 'steps')
		return csv('step-dwell', data.steps, [
			{ header: 'flow', value: (r) => r.flowId },
			{ header: 'step', value: (r) => r.stepId },
			{ header: 'step_title', value: (r) => r.stepTitle },
			{ header: 'answers', value: (r) => r.answers },
			{ header: 'median_minutes', value: (r) => r.medianMinutes },
			{ header: 'p90_minutes', value: (r) => r.p90Minutes }
		]);
	if (filters.format === 'csv')
		return csv('time-to-verdict', data.flows, [
			{ header: 'flow', value: (r) => r.flowId },
			{ header: 'flow_title', value: (r) => r.flowTitle },
			{ header: 'completed_runs', value: (r) => r.runs },
			{ header: 'median_minutes', value: (r) => r.medianMinutes },
			{ header: 'p90_minutes', value: (r) => r.p90Minutes }
		]);
	return json(data satisfies DurationsResponse);
};
