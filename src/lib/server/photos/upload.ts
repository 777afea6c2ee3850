// Reading a photo upload and storing it: the multipart parsing shared by the job and run photo routes.
import { json, type RequestEvent } from '@sveltejs/kit';
import { MAX_PHOTO_BYTES, formatBytes } from '$lib/photos/limits';
import type { PhotoErrorResponse, PhotoUploadResponse } from '$lib/photos/api';
import * as photos from './queries';

const fail = (status: number, body: PhotoErrorResponse) => json(body, { status });

// Room for the multipart envelope and the text fields around the file.
const envelopeSlack = 64 * 1024;

/**
 * Reads a multipart upload with one `file` part (and no other file) and text fields. Refuses before reading the body
 * when the declared length is already too large, so an oversized upload costs no memory.
 */
export async function readUpload(
	event: Pick<RequestEvent, 'request'>
): Promise<{ ok: true; file: File; fields: Record<string, string> } | { ok: false; response: Response }> {
	const { request } = event;
	const type = request.headers.get('content-type') ?? '';
	if (!type.startsWith('multipart/form-data')) {
		return {
			ok: false,
			response: fail(400, {
				message: 'Send the photo as multipart/form-data with the image in a part named "file".',
				code: 'bad-request'
			})
		};
	}
	const length = Number(request.headers.get('content-length') ?? 0);
	if (length > MAX_PHOTO_BYTES + envelopeSlack) return { ok: false, response: tooBig(length) };
	let form: FormData;
	try {
		form = await request.formData();
	} catch {
		return {
			ok: false,
			response: fail(400, { message: 'The upload could not be read.', code: 'bad-request' })
		};
	}
	// One photo per request: a second file part was stored nowhere and answered as if it had been.
	const files = [...form.values()].filter((v) => v instanceof File).length;
	if (files > 1) {
		return {
			ok: false,
			response: fail(400, {
				message: `One photo per request: this one carries ${files} files. Send each photo on its own.`,
				code: 'bad-request'
			})
		};
	}
	const file = form.get('file');
	if (!(file instanceof File)) {
		return {
			ok: false,
			response: fail(400, { message: 'Choose a photo to upload (no "file" part).', code: 'bad-request' })
		};
	}
	if (file.size > MAX_PHOTO_BYTES) return { ok: false, response: tooBig(file.size) };
	const fields: Record<string, string> = {};
	for (const [k, v] of form.entries()) if (typeof v === 'string') fields[k] = v;
	return { ok: true, file, fields };
}

function tooBig(size: number) {
	return fail(413, {
		message: `The file is ${formatBytes(size)}; photos may be at most ${formatBytes(MAX_PHOTO_BYTES)}. Take it at a lower resolution or export a smaller copy.`,
		code: 'too-big'
	});
}

/** Stores the upload against its target; 201 with the photo, or 200 when it was already there. */
export async function store(
	actorId: string,
	target: photos.PhotoTarget,
	file: File,
	fields: { source: 'phone' | 'microscope'; caption: string }
) {
	const bytes = new Uint8Array(await file.arrayBuffer());
	const result = await photos.add(actorId, target, { bytes, source: fields.source, caption: fields.caption });
	return json(result satisfies PhotoUploadResponse, { status: result.duplicate ? 200 : 201 });
}
