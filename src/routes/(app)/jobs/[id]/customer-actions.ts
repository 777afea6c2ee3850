/** The job page's customer-side actions; the route calls requireRole first and passes the user. */
import { fail, type RequestEvent } from '@sveltejs/kit';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import * as quotes from '$lib/server/quotes/queries';
import { getMoney } from '$lib/server/settings/queries';
import { formatAmountInput, parseAmount, parseLines } from '$lib/quotes/input';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { quoteForm, rowsOf } from '$lib/schemas/quote';
import type { QuoteLine } from '$lib/domain/money';
import type { CustomerSection } from './customer-section';
import { formatMoney } from '$lib/domain/money';
import * as refunds from '$lib/server/payments/refunds';
import { act, actionFailure } from '$lib/server/http';
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

export async function sendReport(event: RequestEvent<{ id: string }>, user: User) {
	try {
		const { url } = await send(user.id, event.params.id);
		return {
			action: 'sendReport',
			ok: true,
			message: 'Report sent: the e-mail is in the Outbox queue.',
			url
		};
	} catch (e) {
		return actionFailure(e, { action: 'sendReport', ok: false });
	}
}

export async function revokeLink(event: RequestEvent<{ id: string }>, user: User) {
	const parsed = z.object({ linkId: z.uuid() }).safeParse(Object.fromEntries(await event.request.formData()));
	if (!parsed.success) return fail(400, { action: 'revokeLink', ok: false, message: 'Choose a link.' });
	const done = await links.revoke(event.params.id, parsed.data.linkId, user.id);
	return {
		action: 'revokeLink',
		ok: true,
		message: done ? 'Link revoked: it now shows “no longer valid”.' : 'That link was already closed.'
	};
}

const refundForm = z.object({
	paymentId: z.uuid('Choose a payment.'),
	amount: text('The amount').max(30, 'Enter the amount as a number, e.g. 12.50.'),
	reason: text('The reason').trim().max(500, 'Keep the reason under 500 characters.').default('')
});

/**
 * A lead refunds all or part of a paid payment of this job. The typed amount (major units) becomes
 * integer minor units by string arithmetic; the refund waits briefly for the service's webhook so
 * the page can usually say "refunded" at once.
 */
export async function refund(event: RequestEvent<{ id: string }>, user: User) {
	const raw = Object.fromEntries(await event.request.formData());
	const parsed = refundForm.safeParse(raw);
	const kept = { amount: String(raw.amount ?? ''), reason: String(raw.reason ?? '') };
	const paymentId = typeof raw.paymentId === 'string' ? raw.paymentId : '';
	const refused = (status: number, message: string) =>
		fail(status, { action: 'refund', ok: false, message, paymentId, ...kept });
	if (!parsed.success) return refused(400, parsed.error.issues[0]?.message ?? 'Check the refund.');
	const scope = { type: 'job', idPrefix: `${event.params.id}:` };
	const payment = await refunds.paymentInScope(parsed.data.paymentId, scope);
	if (!payment) return refused(404, 'No such payment on this job.');
	const currency = payment.currency.toUpperCase();
	if (!parsed.data.amount.trim()) return refused(400, 'Enter the amount to refund.');
	const amount = parseAmount(parsed.data.amount, currency);
	if (!amount.ok)
		return refused(400, amount.error.replace('A price', 'A refund').replace(/\bprice\b/g, 'amount'));
	if (amount.value === 0) return refused(400, 'The refund must be more than zero.');
	try {
		const pending = await refunds.requestRefund(user.id, {
			paymentId: payment.id,
			amountMinor: amount.value,
			reason: parsed.data.reason,
			scope
		});
		const done = await refunds.settled(pending.id);
		const m = formatMoney(amount.value, currency, 'en-GB');
		if (done?.status === 'failed')
			return refused(502, `The refund of ${m} failed: ${done.failureReason ?? 'no reason given'}`);
		return {
			action: 'refund',
			ok: true,
			paymentId,
			message:
				done?.status === 'succeeded'
					? `Refunded ${m}.`
					: `Refund of ${m} sent; it shows as refunded once the payment service confirms it.`
		};
	} catch (e) {
		return actionFailure(e, { action: 'refund', ok: false, paymentId, ...kept });
	}
}
