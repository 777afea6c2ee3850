import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { csv, fixed4, parseFilters, unknownTable } from '$lib/server/insights/http';
import type { AbandonedResponse } from '$lib/insights/types';

export type { AbandonedResponse };

const tables = ['reasons', 'steps'] as const;

/** Abandoned runs: the reasons given and the steps they stopped at; CSV per table. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'lead');
	const parsed = parseFilters(event.url);
	if (!parsed.ok) return parsed.response;
	const { filters } = parsed;
	if (filters.table && !tables.includes(filters.table as (typeof tables)[number]))
		return unknownTable(tables);
	const data = await insights.abandoned(filters);
	if (filters.format === 'csv' && filters.table === 'steps')
		return csv('abandoned-steps', data.steps, [
			{ header: 'flow', value: (r) => r.flowId },
			{ header: 'step', value: (r) => r.stepId },
			{ header: 'step_title', value: (r) => r.stepTitle },
			{ header: 'abandoned', value: (r) => r.count }
		]);
	if (filters.format === 'csv')
		return csv('abandoned-reasons', data.reasons, [
			{ header: 'reason', value: (r) => r.reason },
			{ header: 'count', value: (r) => r.count },
			{ header: 'share_of_abandoned', value: (r) => fixed4(r.share) },
			{ header: 'most_common_step', value: (r) => r.commonStep }
		]);
	return json(data satisfies AbandonedResponse);
};
