// Request and response shapes of the photo routes; isomorphic, so the upload component and the
// server agree, and the OpenAPI document can be generated from the same schemas.
import { z } from 'zod';
import { storable, text, unstorableMessage } from '$lib/schemas/text';
import { MAX_CAPTION_LENGTH, photoSources, type PhotoDto, type PhotoRejectionCode } from './limits';

export const photoId = z.uuid({ message: 'Not a photo id.' });

/** The text fields of a multipart upload (the file itself is the `file` part). */
export const photoUploadFields = z.object({
	source: z.enum(photoSources, { message: 'Source must be phone or microscope.' }).default('phone'),
	caption: text('The caption')
		.max(MAX_CAPTION_LENGTH, { message: `A caption may be at most ${MAX_CAPTION_LENGTH} characters.` })
		.default('')
});

/** A run photo also names the flow step it was taken at. */
export const runPhotoUploadFields = photoUploadFields.extend({
	stepId: z
		.string({ message: 'Say which step the photo belongs to (stepId).' })
		.refine(storable, { error: unstorableMessage('The step id') })
		.min(1, { message: 'Say which step the photo belongs to (stepId).' })
		.max(200)
});

/** GET /api/runs/:id/photos?stepId= — one step's photos, or all of the run's without it. */
export const runPhotoListQuery = z.object({
	stepId: text('The step id').min(1, { message: 'Name the step (stepId).' }).max(200).optional()
});

export const photoPatch = z
	.object({
		caption: text('The caption').max(MAX_CAPTION_LENGTH).optional(),
		shownToCustomer: z.boolean().optional()
	})
	.strict()
	.refine((v) => v.caption !== undefined || v.shownToCustomer !== undefined, {
		message: 'Nothing to change: send caption and/or shownToCustomer.'
	});

export type PhotoUploadResponse = { photo: PhotoDto; duplicate: boolean };
export type PhotoListResponse = { photos: PhotoDto[] };
export type PhotoResponse = { photo: PhotoDto };
export type PhotoErrorResponse = {
	message: string;
	code?: PhotoRejectionCode | 'bad-request' | 'not-found' | 'forbidden' | 'unknown-step';
	issues?: { path: string; message: string }[];
};
