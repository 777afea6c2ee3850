import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as deviceModels from '$lib/server/jobs/device-models';
import { badRequest } from '$lib/server/http';
import { deviceModelQuery } from '$lib/schemas/device-model';
import type { DeviceModelsResponse } from '$lib/jobs/api-types';
import type { RequestHandler } from './$types';

/** GET /api/device-models?q= — suggestions for intake's maker and model fields. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	const parsed = deviceModelQuery.safeParse({ q: event.url.searchParams.get('q') ?? undefined });
	if (!parsed.success) return badRequest(parsed.error);
	const body: DeviceModelsResponse = { models: await deviceModels.search(parsed.data.q) };
	return json(body);
};
