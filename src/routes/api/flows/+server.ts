import { json } from '@sveltejs/kit';
import { requireUser } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import type { RequestHandler } from './$types';

export type FlowListResponse = { flows: flowLibrary.LibraryEntry[] };

/** GET /api/flows — the library as the signed-in role sees it (technicians: published flows only). */
export const GET: RequestHandler = async (event) => {
	const user = requireUser(event);
	const body: FlowListResponse = { flows: await flowLibrary.listLibrary(user.role) };
	return json(body);
};
