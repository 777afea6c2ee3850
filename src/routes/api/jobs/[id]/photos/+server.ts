import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as photos from '$lib/server/photos/queries';
import { answer, badRequestFirst, errorResponse, RuleError } from '$lib/server/http';
import { readUpload, store } from '$lib/server/photos/upload';
import { photoId, photoUploadFields, type PhotoListResponse } from '$lib/photos/api';
import type { RequestHandler } from './$types';

export type { PhotoListResponse, PhotoUploadResponse, PhotoErrorResponse } from '$lib/photos/api';

const notFound = () => errorResponse(new RuleError(404, 'not-found', 'No such job.'));

/** GET /api/jobs/:id/photos: every photo of the job, run photos included, oldest first. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	if (!photoId.safeParse(event.params.id).success) return notFound();
	return json({ photos: await photos.listForJob(event.params.id) } satisfies PhotoListResponse);
};

/**
 * POST /api/jobs/:id/photos (multipart: file, source phone|microscope, caption): a job-level photo.
 * 201 stored; 200 the same file was already on this job; 413 too big; 415 not an image or an
 * unsupported type; 422 damaged or too many pixels; 404 unknown job. Every refusal says why.
 */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'technician');
	if (!photoId.safeParse(event.params.id).success) return notFound();
	const upload = await readUpload(event);
	if (!upload.ok) return upload.response;
	const fields = photoUploadFields.safeParse(upload.fields);
	if (!fields.success) return badRequestFirst(fields.error);
	return answer(() => store(user.id, { jobId: event.params.id }, upload.file, fields.data));
};
