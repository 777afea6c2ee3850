/** The job page's customer-side actions; the route calls requireRole first and passes the user. */
import { fail, type RequestEvent } from '@sveltejs/kit';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import * as quotes from '$lib/server/quotes/queries';
import { getMoney } from '$lib/server/settings/queries';
import { parseAmount, parseLines, type RawLine } from '$lib/quotes/input';
import { formatMoney } from '$lib/domain/money';
import * as refunds from '$lib/server/payments/refunds';
import { actionFailure } from '$lib/server/http';
import * as links from '$lib/server/reports/links';
import { sendReport as send } from '$lib/server/reports/customer';

type User = { id: string };
const texts = (form: FormData, name: string) =>
	form.getAll(name).map((v) => (typeof v === 'string' ? v : ''));

export async function saveQuote(event: RequestEvent<{ id: string }>, user: User) {
	const form = await event.request.formData();
	const [description, kind, quantity, unit] = ['description', 'kind', 'quantity', 'unit'].map((n) =>
		texts(form, n)
	);
	const raw: RawLine[] = description.map((d, i) => ({
		description: d,
		kind: kind[i] ?? '',
		quantity: quantity[i] ?? '',
		unit: unit[i] ?? ''
	}));
	const money = await getMoney();
	const parsed = parseLines(raw, money.currency);
	if (!parsed.ok)
		return fail(400, {
			action: 'quote',
			ok: false,
			message: parsed.form ?? 'Some lines need a look; see the marked fields.',
			lineErrors: parsed.errors
		});
	const proposal = String(form.get('proposal') ?? '');
	if (proposal.length > 5000)
		return fail(400, { action: 'quote', ok: false, message: 'Keep the proposal under 5000 characters.' });
	try {
		const saved = await quotes.save(user.id, event.params.id, { lines: parsed.lines, proposal });
		return { action: 'quote', ok: true, message: `Quote version ${saved.version} saved.` };
	} catch (e) {
		return actionFailure(e, { action: 'quote', ok: false });
	}
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
