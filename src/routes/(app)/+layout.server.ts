import { requireUser } from '$lib/server/guards';
import * as settings from '$lib/server/settings/queries';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async (event) => {
	const user = requireUser(event);
	const shop = await settings.getShop();
	return { user, shop };
};
