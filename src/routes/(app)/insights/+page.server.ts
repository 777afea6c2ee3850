import type { PageServerLoad } from './$types';
import { requireRole } from '$lib/server/guards';
import * as insights from '$lib/server/insights/queries';
import { historyStatus } from '$lib/server/demo/history-status';

/** The filter lists (flows, versions, models, technicians that occur in the history). */
export const load: PageServerLoad = async (event) => {
	requireRole(event, 'lead');
	return { options: await insights.options(), history: historyStatus() };
};
