import { error } from '@sveltejs/kit';
import QRCode from 'qrcode';
import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import { absoluteUrl } from '$lib/server/public-url';
import { formatJobNumber, liquidLabels } from '$lib/schemas/job';
import { urgencyAt } from '$lib/domain/queue';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const job = await jobs.get(event.params.id);
	if (!job) error(404, { message: 'No job with this id.' });
	// The code opens the job page; only signed-in staff get past the sign-in there.
	const url = absoluteUrl(`/jobs/${job.id}`);
	const svg = await QRCode.toString(url, { type: 'svg', margin: 0, errorCorrectionLevel: 'M' });
	return {
		label: {
			id: job.id,
			number: formatJobNumber(job.number),
			device: `${job.maker} ${job.model}`,
			customer: job.customer.name,
			takenIn: job.createdAt,
			promisedAt: job.promisedAt,
			// Paper does not age: the label prints the urgency at printing with what it was computed from.
			urgency: urgencyAt(job, new Date()),
			liquid: liquidLabels[job.liquid],
			exposedAt: job.exposedAt,
			dataFirst: job.dataFirst,
			identifierTail: (job.imei ?? job.serial ?? '').slice(-4),
			url,
			// An <img> with a data: URL (CSP img-src allows data:), so no markup is injected.
			qr: `data:image/svg+xml;base64,${Buffer.from(svg).toString('base64')}`
		}
	};
};
