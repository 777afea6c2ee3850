import { error, fail } from '@sveltejs/kit';
import DOMPurify from 'isomorphic-dompurify';
import { z } from 'zod';
import { requireRole } from '$lib/server/guards';
import { actionFailure } from '$lib/server/http';
import * as outbox from '$lib/server/mail/outbox';
import type { Actions, PageServerLoad } from './$types';

const idSchema = z.uuid();

/**
 * Mail HTML is shown in a sandboxed frame (no scripts, no forms, no navigation) after DOMPurify has
 * taken out anything active, so even a template bug cannot run code in a lead's session.
 */
function sanitiseMailHtml(html: string) {
	return DOMPurify.sanitize(html, {
		WHOLE_DOCUMENT: true,
		FORBID_TAGS: ['form', 'input', 'button', 'iframe']
	});
}

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'lead');
	const id = idSchema.safeParse(event.params.id);
	const mail = id.success ? await outbox.get(id.data) : undefined;
	if (!mail) error(404, { message: 'No mail with this id.' });
	return { mail: { ...mail, html: mail.html ? sanitiseMailHtml(mail.html) : null } };
};

export const actions: Actions = {
	retry: async (event) => {
		const lead = requireRole(event, 'lead');
		const id = idSchema.safeParse(event.params.id);
		if (!id.success) return fail(400, { message: 'That request was malformed.', ok: false });
		try {
			await outbox.retryNow(lead.id, id.data);
			return { message: 'Queued again; it goes out within seconds.', ok: true };
		} catch (e) {
			return actionFailure(e, { ok: false });
		}
	}
};
