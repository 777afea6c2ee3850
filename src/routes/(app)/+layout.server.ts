import { requireUser } from '$lib/server/guards';
import * as settings from '$lib/server/settings/queries';
import * as today from '$lib/server/today/queries';
import * as shop from '$lib/server/today/lead';
import { hasRole } from '$lib/roles';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async (event) => {
	const user = requireUser(event);
	const now = new Date();
	// Counts beside the sections where something waits: reviews (seniors and leads), overdue jobs and
	// failed e-mails (leads). Each is one short count; they refresh with every form action.
	const [shopInfo, reviews, overdue, failed] = await Promise.all([
		settings.getShop(),
		hasRole(user.role, 'senior') ? today.reviewsWaitingCount(user.id) : 0,
		hasRole(user.role, 'lead') ? shop.overdueCount(now) : 0,
		hasRole(user.role, 'lead') ? shop.failedMailCount() : 0
	]);
	const counts: Record<string, { n: number; label: string }> = {};
	if (reviews)
		counts['/flows'] = { n: reviews, label: `${reviews} draft${reviews === 1 ? '' : 's'} to review` };
	if (overdue) counts['/jobs'] = { n: overdue, label: `${overdue} job${overdue === 1 ? '' : 's'} overdue` };
	if (failed) counts['/outbox'] = { n: failed, label: `${failed} e-mail${failed === 1 ? '' : 's'} failed` };
	return { user, shop: shopInfo, counts };
};
