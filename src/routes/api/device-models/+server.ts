import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/guards';
import * as deviceModels from '$lib/server/jobs/device-models';
import { badRequest } from '$lib/server/jobs/http';
import type { RequestHandler } from './$types';

export type DeviceModelsResponse = { models: deviceModels.DeviceModelSuggestion[] };

const query = z.object({ q: z.string().trim().max(100, 'Search with at most 100 characters.').default('') });

/** GET /api/device-models?q= — suggestions for intake's maker and model fields. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	const parsed = query.safeParse({ q: event.url.searchParams.get('q') ?? undefined });
	if (!parsed.success) return badRequest(parsed.error);
	const body: DeviceModelsResponse = { models: await deviceModels.search(parsed.data.q) };
	return json(body);
};
