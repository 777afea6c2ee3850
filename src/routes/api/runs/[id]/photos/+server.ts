import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as photos from '$lib/server/photos/queries';
import { answer, badRequestFirst, errorResponse, RuleError } from '$lib/server/http';
import { readUpload, store } from '$lib/server/photos/upload';
import { photoId, runPhotoListQuery, runPhotoUploadFields, type PhotoListResponse } from '$lib/photos/api';
import type { RequestHandler } from './$types';

export type { PhotoListResponse, PhotoUploadResponse, PhotoErrorResponse } from '$lib/photos/api';

const notFound = () => errorResponse(new RuleError(404, 'not-found', 'No such run.'));

/** GET /api/runs/:id/photos[?stepId=…]: the run's photos (of one step when asked), oldest first. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	if (!photoId.safeParse(event.params.id).success) return notFound();
	const query = runPhotoListQuery.safeParse({ stepId: event.url.searchParams.get('stepId') ?? undefined });
	if (!query.success) return badRequestFirst(query.error);
	const list = await photos.listForRun(event.params.id, query.data.stepId);
	return json({ photos: list } satisfies PhotoListResponse);
};

/**
 * POST /api/runs/:id/photos (multipart: file, stepId, source, caption): a photo taken at a step of
 * the run, filed on the run's job too. The step must be one of the run's pinned flow version.
 * Same answers as POST /api/jobs/:id/photos, plus 400 for a step the flow does not have.
 */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	if (!photoId.safeParse(event.params.id).success) return notFound();
	const upload = await readUpload(event);
	if (!upload.ok) return upload.response;
	const fields = runPhotoUploadFields.safeParse(upload.fields);
	if (!fields.success) return badRequestFirst(fields.error);
	return answer(async () => {
		const target = await photos.runTarget(event.params.id, fields.data.stepId);
		return store(user.id, target, upload.file, fields.data);
	});
};
