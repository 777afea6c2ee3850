import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import { getDb } from '$lib/server/db';
import { mailStatuses } from '$lib/server/db/schema/mail';
import { requireRole } from '$lib/server/guards';
import { refusalOf } from '$lib/server/http';
import { describeSmtpUrl, smtpUrl, usingFakeSmtp } from '$lib/server/mail/config';
import * as outbox from '$lib/server/mail/outbox';
import { enqueue } from '$lib/server/mail/queue';
import { testMessage } from '$lib/server/mail/templates';
import { getShop } from '$lib/server/settings/queries';
import type { Actions, PageServerLoad } from './$types';

const statusFilter = z.enum(mailStatuses).optional().catch(undefined);
const idSchema = z.object({ id: z.uuid('That request was malformed.') });
const testSchema = z.object({ to: z.email('Enter an e-mail address.').max(254) });

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'lead');
	const status = statusFilter.parse(event.url.searchParams.get('status') ?? undefined);
	const [mails, counts] = await Promise.all([outbox.list({ status }), outbox.counts()]);
	const url = smtpUrl();
	return {
		mails,
		counts,
		status: status ?? null,
		transport: {
			mode: url ? (usingFakeSmtp() ? 'fake' : 'smtp') : 'none',
			address: describeSmtpUrl(url)
		} as const
	};
};

export const actions: Actions = {
	retry: async (event) => {
		const lead = requireRole(event, 'lead');
		const parsed = idSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success)
			return fail(400, { row: { id: '', message: parsed.error.issues[0].message, ok: false } });
		try {
			await outbox.retryNow(lead.id, parsed.data.id);
			return { row: { id: parsed.data.id, message: 'Queued again; it goes out within seconds.', ok: true } };
		} catch (e) {
			const { status, body } = refusalOf(e);
			return fail(status, { row: { id: parsed.data.id, message: body.message, ok: false } });
		}
	},

	test: async (event) => {
		const lead = requireRole(event, 'lead');
		const parsed = testSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { test: { message: parsed.error.issues[0].message, ok: false } });
		const shop = await getShop();
		const db = await getDb();
		await enqueue(db, { to: parsed.data.to, ...testMessage({ shop, sentBy: lead.name }) });
		return { test: { message: `A test message to ${parsed.data.to} is queued.`, ok: true } };
	}
};
