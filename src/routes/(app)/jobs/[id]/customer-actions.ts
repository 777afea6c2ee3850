/** The job page's customer-side actions; the route calls requireRole first and passes the user. */
import { fail, type RequestEvent } from '@sveltejs/kit';
import { z } from 'zod';
import * as quotes from '$lib/server/quotes/queries';
import { getMoney } from '$lib/server/settings/queries';
import { formatAmountInput, parseAmount, parseLines } from '$lib/quotes/input';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { refundForm, refundFormId } from '$lib/schemas/refund';
import { zod4 } from 'sveltekit-superforms/adapters';
import { quoteForm, rowsOf } from '$lib/schemas/quote';
import type { QuoteLine } from '$lib/domain/money';
import type { CustomerSection } from './customer-section';
import { formatMoney } from '$lib/domain/money';
import * as refunds from '$lib/server/payments/refunds';
import { act } from '$lib/server/http';
import * as links from '$lib/server/reports/links';
import { sendReport as send } from '$lib/server/reports/customer';

type User = { id: string };

const quoteAdapter = (currency: string) => zod4(quoteForm(currency));

/** The quote form as the page opens it: the current version's lines, or a diagnostic fee to price. */
export async function quoteFormFor(section: CustomerSection) {
	const quote = section.quote;
	const currency = quote?.currency ?? section.money.currency;
	const lines = (quote?.lines ?? []) as QuoteLine[];
	const data = quote
		? {
				description: lines.map((l) => l.description),
				kind: lines.map((l) => l.kind),
				quantity: lines.map((l) => String(l.quantity)),
				unit: lines.map((l) => formatAmountInput(l.unitMinor, currency)),
				proposal: quote.proposal ?? ''
			}
		: { description: ['Diagnosis'], kind: ['fee'], quantity: ['1'], unit: [''], proposal: '' };
	return superValidate(data, quoteAdapter(section.money.currency), { id: 'quote', errors: false });
}

export async function saveQuote(event: RequestEvent<{ id: string }>, user: User) {
	const money = await getMoney();
	const form = await superValidate(event.request, quoteAdapter(money.currency), { id: 'quote' });
	if (!form.valid) return fail(400, { form });
	return act(form, async () => {
		const parsed = parseLines(rowsOf(form.data), money.currency);
		if (!parsed.ok) throw new Error('A quote the form schema passed did not parse.');
		const saved = await quotes.save(user.id, event.params.id, {
			lines: parsed.lines,
			proposal: form.data.proposal
		});
		return message(form, `Quote version ${saved.version} saved.`);
	});
}

// "Send report" posts nothing but the button; a superform still carries its message and refusal.
const sendReportAdapter = zod4(z.object({}));
/** "Revoke" on one live link: a row superform, id `revokeLink-<link id>`. */
const revokeLinkAdapter = zod4(z.object({ linkId: z.uuid('Choose a link.') }));

/** The sendReport form as the page opens it. */
export const sendReportFormFor = () => superValidate(sendReportAdapter, { id: 'sendReport' });

/** Answers with the private link beside the form: shown once, to copy into a text message. */
export async function sendReport(event: RequestEvent<{ id: string }>, user: User) {
	const form = await superValidate(event.request, sendReportAdapter, { id: 'sendReport' });
	return act(form, async () => {
		const { url } = await send(user.id, event.params.id);
		return { ...message(form, 'Report sent: the e-mail is in the Outbox queue.'), reportUrl: url };
	});
}

export async function revokeLink(event: RequestEvent<{ id: string }>, user: User) {
	const body = await event.request.formData();
	const id = `revokeLink-${String(body.get('linkId') ?? '')}`;
	const form = await superValidate(body, revokeLinkAdapter, { id });
	if (!form.valid) return fail(400, { form });
	return act(form, async () => {
		const done = await links.revoke(event.params.id, form.data.linkId, user.id);
		return message(
			form,
			done ? 'Link revoked: it now shows “no longer valid”.' : 'That link was already closed.'
		);
	});
}

const refundAdapter = zod4(refundForm);

/**
 * A lead refunds all or part of a paid payment of this job. The typed amount (major units) becomes
 * integer minor units by string arithmetic; the refund waits briefly for the service's webhook so
 * the page can usually say "refunded" at once.
 */
export async function refund(event: RequestEvent<{ id: string }>, user: User) {
	const body = await event.request.formData();
	const id = refundFormId(String(body.get('paymentId') ?? ''));
	const form = await superValidate(body, refundAdapter, { id });
	// A refusal of the amount goes beside it; any other under the form. The status is kept.
	const refused = (status: number, text: string, field: 'amount' | '' = '') =>
		setError(form, field, text, { status: status as 400 });
	if (!form.valid) return fail(400, { form });
	const scope = { type: 'job', idPrefix: `${event.params.id}:` };
	const payment = await refunds.paymentInScope(form.data.paymentId, scope);
	if (!payment) return refused(404, 'No such payment on this job.');
	const currency = payment.currency.toUpperCase();
	if (!form.data.amount.trim()) return refused(400, 'Enter the amount to refund.', 'amount');
	const amount = parseAmount(form.data.amount, currency);
	if (!amount.ok)
		return refused(
			400,
			amount.error.replace('A price', 'A refund').replace(/\bprice\b/g, 'amount'),
			'amount'
		);
	if (amount.value === 0) return refused(400, 'The refund must be more than zero.', 'amount');
	return act(form, async () => {
		const pending = await refunds.requestRefund(user.id, {
			paymentId: payment.id,
			amountMinor: amount.value,
			reason: form.data.reason,
			scope
		});
		const done = await refunds.settled(pending.id);
		const m = formatMoney(amount.value, currency, 'en-GB');
		if (done?.status === 'failed')
			return refused(502, `The refund of ${m} failed: ${done.failureReason ?? 'no reason given'}`);
		return message(
			form,
			done?.status === 'succeeded'
				? `Refunded ${m}.`
				: `Refund of ${m} sent; it shows as refunded once the payment service confirms it.`
		);
	});
}
