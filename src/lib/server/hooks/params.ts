import { error, json, type Handle } from '@sveltejs/kit';
import { isUuid } from '$lib/schemas/ids';

// Flow ids are kebab-case names ("restart-loop-after-liquid"); every other `[id]` and every
// `[draftId]` in src/routes is a UUID. Checked here, once, before any load, action or handler runs,
// so a page or API route given `------…` answers 404 instead of passing it to PostgreSQL (500).
const KEBAB_ID_ROUTE = /^\/(?:\(app\)\/)?(?:api\/)?flows\/\[id\]/;
const UUID_PARAMS = ['id', 'draftId'] as const;

export function badIdParam(routeId: string | null, params: Partial<Record<string, string>>) {
	if (!routeId) return null;
	for (const name of UUID_PARAMS) {
		const value = params[name];
		if (value === undefined) continue;
		if (name === 'id' && KEBAB_ID_ROUTE.test(routeId)) continue;
		if (!isUuid(value)) return name;
	}
	return null;
}

export const paramsHandle: Handle = async ({ event, resolve }) => {
	const bad = badIdParam(event.route.id, event.params);
	if (bad) {
		const message = 'Nothing here: that id is not a valid id.';
		if (event.url.pathname.startsWith('/api/')) return json({ message }, { status: 404 });
		error(404, { message });
	}
	return resolve(event);
};
