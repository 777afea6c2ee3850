import { fail, type RequestEvent } from '@sveltejs/kit';
import type { ReportLink } from '$lib/server/db/schema/quotes';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { openLink } from '$lib/server/reports/gate';
import { touch } from '$lib/server/reports/links';
import * as report from '$lib/server/reports/report';
import * as quotes from '$lib/server/quotes/queries';
import { startPayment } from '$lib/server/reports/customer';
import { actionFailure, isRuleError } from '$lib/server/http';
import type { Actions, PageServerLoad } from './$types';

// Public (allow-listed in guards.spec.ts): the customer has no account. Every handler opens with
// openLink(event), which rate-limits the address and checks the token (live, unexpired, one job).

export const load: PageServerLoad = async (event) => {
	const link = await openLink(event);
	const [, r, versions] = await Promise.all([
		touch(link.id),
		report.build(link.jobId, 'customer', `/r/${event.params.token}/photos`),
		quotes.listForJob(link.jobId)
	]);
	if (!r) return { report: null, options: [] };
	const visible = quotes.customerVisible(versions);
	return {
		report: r,
		options: quotes.paymentOptions(visible, r.paidMinor + r.refundedMinor),
		returned: event.url.searchParams.has('paid')
	};
};

const decisionForm = z.object({
	quoteId: z.uuid('Reload the page.'),
	name: text('Your name').max(200).default('')
});
const payForm = z.object({ quoteId: z.uuid('Reload the page.'), kind: z.enum(['fee', 'rest']) });

async function decide(event: RequestEvent, link: ReportLink, decision: 'approved' | 'declined') {
	const parsed = decisionForm.safeParse(Object.fromEntries(await event.request.formData()));
	if (!parsed.success)
		return fail(400, { action: decision, ok: false, message: parsed.error.issues[0].message });
	try {
		const { changed } = await quotes.decide(link.jobId, parsed.data.quoteId, decision, parsed.data.name);
		const words = decision === 'approved' ? 'approved' : 'declined';
		return {
			action: decision,
			ok: true,
			message: changed ? `Thank you: the quote is ${words}.` : `You had already ${words} this quote.`
		};
	} catch (e) {
		return actionFailure(e, { action: decision, ok: false });
	}
}

export const actions: Actions = {
	approve: async (event) => {
		const link = await openLink(event);
		return decide(event, link, 'approved');
	},
	decline: async (event) => {
		const link = await openLink(event);
		return decide(event, link, 'declined');
	},
	/** Answers with the checkout address; the page goes there (CSP form-action keeps forms on this origin). */
	pay: async (event) => {
		const link = await openLink(event);
		const parsed = payForm.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { action: 'pay', ok: false, message: 'Choose what to pay.' });
		try {
			const checkout = await startPayment(
				link.jobId,
				parsed.data.quoteId,
				parsed.data.kind,
				`/r/${event.params.token}`
			);
			return { action: 'pay', ok: true, message: 'Opening the payment page…', checkoutUrl: checkout.url };
		} catch (e) {
			// The customer is told what they can do, not how the shop's server is set up.
			if (isRuleError(e, 'payments-not-configured'))
				return fail(503, {
					action: 'pay',
					ok: false,
					message: 'Online payment is not available at the moment; you can pay at the counter.'
				});
			return actionFailure(e, { action: 'pay', ok: false });
		}
	}
};
