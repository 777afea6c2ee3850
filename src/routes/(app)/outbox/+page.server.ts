import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { getDb } from '$lib/server/db';
import { mailStatuses } from '$lib/server/db/schema/mail';
import { requireRole } from '$lib/server/guards';
import { act } from '$lib/server/http';
import { describeSmtpUrl, smtpUrl, usingFakeSmtp } from '$lib/server/mail/config';
import * as outbox from '$lib/server/mail/outbox';
import { enqueue } from '$lib/server/mail/queue';
import { testMessage } from '$lib/server/mail/templates';
import { getShop } from '$lib/server/settings/queries';
import type { Actions, PageServerLoad } from './$types';
import { retryMail, sendTest } from './schema';

const statusFilter = z.enum(mailStatuses).optional().catch(undefined);
const retryAdapter = zod4(retryMail);
const testAdapter = zod4(sendTest);

export const load: PageServerLoad = async (event) => {
	const lead = requireRole(event, 'lead');
	const status = statusFilter.parse(event.url.searchParams.get('status') ?? undefined);
	const [mails, counts, testForm] = await Promise.all([
		outbox.list({ status }),
		outbox.counts(),
		superValidate({ to: lead.email }, testAdapter, { id: 'send-test', errors: false })
	]);
	const url = smtpUrl();
	return {
		mails,
		counts,
		status: status ?? null,
		testForm,
		transport: {
			mode: url ? (usingFakeSmtp() ? 'fake' : 'smtp') : 'none',
			address: describeSmtpUrl(url)
		} as const
	};
};

export const actions: Actions = {
	retry: async (event) => {
		const lead = requireRole(event, 'lead');
		const body = await event.request.formData();
		const form = await superValidate(body, retryAdapter, { id: `retry-${String(body.get('id') ?? '')}` });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			await outbox.retryNow(lead.id, form.data.id);
			return message(form, 'Queued again; it goes out within seconds.');
		});
	},

	test: async (event) => {
		const lead = requireRole(event, 'lead');
		const form = await superValidate(event.request, testAdapter, { id: 'send-test' });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const shop = await getShop();
			const db = await getDb();
			await enqueue(db, { to: form.data.to, ...testMessage({ shop, sentBy: lead.name }) });
			return message(form, `A test message to ${form.data.to} is queued.`);
		});
	}
};
