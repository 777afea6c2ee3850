import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import type { PageServerLoad } from './$types';

/** The list itself comes from GET /api/jobs (see +page.ts); the server adds the filter choices. */
export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	return { staff: await jobs.assignableStaff() };
};
