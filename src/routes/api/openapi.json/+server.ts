import { json } from '@sveltejs/kit';
import { requireUser } from '$lib/server/guards';
import { openApiDocument } from '$lib/server/openapi/document';
import type { RequestHandler } from './$types';

/** GET /api/openapi.json — the bench API's OpenAPI 3.1 document, generated from the routes' zod schemas. */
export const GET: RequestHandler = async (event) => {
	requireUser(event);
	return json(openApiDocument(), { headers: { 'cache-control': 'private, max-age=300' } });
};
