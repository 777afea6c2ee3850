import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/guards';
import * as photos from '$lib/server/photos/queries';
import { photoId } from '$lib/photos/api';
import { photoSizes, type PhotoSize } from '$lib/photos/limits';
import type { RequestHandler } from './$types';

/**
 * GET /photos/:id/thumb|display|original: the image bytes, to signed-in staff only (a signed-out
 * visitor is sent to sign in). A given id and size never change, so the answer may be cached for
 * long, but only by the browser (private): photos show customers' devices and are not public.
 */
export const GET: RequestHandler = async (event) => {
	requireUser(event);
	const size = event.params.size as PhotoSize;
	if (!photoId.safeParse(event.params.id).success || !photoSizes.includes(size)) {
		error(404, { message: 'No such photo.' });
	}
	const found = await photos.read(event.params.id, size);
	if (!found) error(404, { message: 'No such photo.' });
	const etag = `"${found.key}"`;
	const headers = {
		'content-type': found.mime,
		'x-content-type-options': 'nosniff',
		'content-disposition': `inline; filename="photo-${event.params.id}-${size}.${extension(found.mime)}"`,
		'cache-control': 'private, max-age=31536000, immutable',
		etag
	};
	if (event.request.headers.get('if-none-match') === etag)
		return new Response(null, { status: 304, headers });
	return new Response(found.bytes as Uint8Array<ArrayBuffer>, {
		headers: { ...headers, 'content-length': String(found.bytes.byteLength) }
	});
};

function extension(mime: string) {
	return mime === 'image/png' ? 'png' : mime === 'image/jpeg' ? 'jpg' : 'webp';
}
