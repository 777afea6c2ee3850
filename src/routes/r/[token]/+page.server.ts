import { fail, type RequestEvent } from '@sveltejs/kit';
import type { ReportLink } from '$lib/server/db/schema/quotes';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { openLink } from '$lib/server/reports/gate';
import { touch } from '$lib/server/reports/links';
import * as report from '$lib/server/reports/report';
import * as quotes from '$lib/server/quotes/queries';
import { startPayment } from '$lib/server/reports/customer';
import { act, formFailure, isRuleError } from '$lib/server/http';
import type { Actions, PageServerLoad } from './$types';
import { decisionForm, payForm, type PayKind } from './schema';

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

const decisionAdapter = zod4(decisionForm);
const payAdapter = zod4(payForm);

async function decide(event: RequestEvent, link: ReportLink, decision: 'approved' | 'declined') {
	const form = await superValidate(event.request, decisionAdapter, { id: 'decision' });
	if (!form.valid) return fail(400, { form });
	return act(form, async () => {
		const { changed } = await quotes.decide(link.jobId, form.data.quoteId, decision, form.data.name);
		const words = decision === 'approved' ? 'approved' : 'declined';
		return message(
			form,
			changed ? `Thank you: the quote is ${words}.` : `You had already ${words} this quote.`
		);
	});
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
		const form = await superValidate(event.request, payAdapter, { id: 'pay' });
		if (!form.valid) return fail(400, { form });
		try {
			const checkout = await startPayment(
				link.jobId,
				form.data.quoteId,
				form.data.kind as PayKind,
				`/r/${event.params.token}`
			);
			return { ...message(form, 'Opening the payment page…'), checkoutUrl: checkout.url };
		} catch (e) {
			// The customer is told what they can do, not how the shop's server is set up.
			if (isRuleError(e, 'payments-not-configured'))
				return setError(
					form,
					'',
					'Online payment is not available at the moment; you can pay at the counter.',
					{
						status: 503
					}
				);
			return formFailure(form, e);
		}
	}
};
