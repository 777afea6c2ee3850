import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as report from '$lib/server/reports/report';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const r = await report.build(event.params.id, 'staff');
	if (!r) error(404, { message: 'No job with this id.' });
	return { report: r };
};
