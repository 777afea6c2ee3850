import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as photos from '$lib/server/photos/queries';
import { answer, badRequestFirst, errorResponse, readJson, RuleError } from '$lib/server/http';
import { photoId, photoPatch, type PhotoResponse } from '$lib/photos/api';
import type { RequestHandler } from './$types';

export type { PhotoResponse, PhotoErrorResponse } from '$lib/photos/api';

const notFound = () => errorResponse(new RuleError(404, 'not-found', 'No such photo.'));

/** GET /api/photos/:id: one photo's record (the image itself is at /photos/:id/:size). */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	if (!photoId.safeParse(event.params.id).success) return notFound();
	const photo = await photos.get(event.params.id);
	return photo ? json({ photo } satisfies PhotoResponse) : notFound();
};

/**
 * PATCH /api/photos/:id { caption?, shownToCustomer? }: by the uploader, a senior or the lead.
 * 403 for anyone else; audited.
 */
export const PATCH: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	if (!photoId.safeParse(event.params.id).success) return notFound();
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = photoPatch.safeParse(read.body);
	if (!parsed.success) return badRequestFirst(parsed.error);
	return answer(async () =>
		json({ photo: await photos.update(user, event.params.id, parsed.data) } satisfies PhotoResponse)
	);
};

/** DELETE /api/photos/:id: removes the photo (and its files when nothing else uses them); audited. */
export const DELETE: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	if (!photoId.safeParse(event.params.id).success) return notFound();
	return answer(async () => {
		await photos.remove(user, event.params.id);
		return new Response(null, { status: 204 });
	});
};
