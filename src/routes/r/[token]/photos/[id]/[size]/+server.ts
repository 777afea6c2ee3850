import { error } from '@sveltejs/kit';
import { and, eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { attachments } from '$lib/server/db/schema/attachments';
import { openLink } from '$lib/server/reports/gate';
import * as photos from '$lib/server/photos/queries';
import { photoId } from '$lib/photos/api';
import type { RequestHandler } from './$types';

/**
 * GET /r/:token/photos/:id/thumb|display: a photo the technician chose for the customer, of the
 * link's own job only (public, allow-listed: authenticated by the link's token). The original
 * size is not offered here.
 */
export const GET: RequestHandler = async (event) => {
	const link = await openLink(event);
	const size = event.params.size;
	if (!photoId.safeParse(event.params.id).success || (size !== 'thumb' && size !== 'display'))
		error(404, { message: 'No such photo.' });
	const db = await getDb();
	const [row] = await db
		.select({ id: attachments.id })
		.from(attachments)
		.where(
			and(
				eq(attachments.id, event.params.id),
				eq(attachments.jobId, link.jobId),
				eq(attachments.shownToCustomer, true)
			)
		);
	const found = row ? await photos.read(row.id, size) : null;
	if (!found) error(404, { message: 'No such photo.' });
	return new Response(found.bytes as Uint8Array<ArrayBuffer>, {
		headers: {
			'content-type': found.mime,
			'content-length': String(found.bytes.byteLength),
			'x-content-type-options': 'nosniff',
			// Not cached: a photo taken off the report, or a revoked link, must stop showing it.
			'cache-control': 'private, no-store'
		}
	});
};
