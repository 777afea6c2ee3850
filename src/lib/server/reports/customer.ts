/**
 * The customer side of a job: send the report link, take payment through the hosted checkout,
 * apply confirmed payments (webhook), and tell the customer the phone is ready. Mail is only
 * queued, inside the transaction of the change it reports.
 */
import { and, eq, isNotNull, sql } from 'drizzle-orm';
import { getDb, type Tx } from '$lib/server/db';
import { customers, jobs, type Job } from '$lib/server/db/schema/jobs';
import { quotes } from '$lib/server/db/schema/quotes';
import { runs } from '$lib/server/db/schema/runs';
import { attachments } from '$lib/server/db/schema/attachments';
import type { Payment, PaymentStatus } from '$lib/server/db/schema/payments';
import { record } from '$lib/server/audit';
import { enqueue } from '$lib/server/mail/queue';
import {
	paymentReceipt,
	readyToCollect,
	refundNotice,
	reportReady,
	type ShopInfo
} from '$lib/server/mail/templates';
import { createCheckout } from '$lib/server/payments/checkout';
import type { RefundChange } from '$lib/server/payments/changes';
import { absoluteUrl } from '$lib/server/public-url';
import { getReport, getShop, shopSchema } from '$lib/server/settings/queries';
import { settings as settingsTable } from '$lib/server/db/schema/settings';
import { formatJobNumber } from '$lib/schemas/job';
import * as quoteQueries from '$lib/server/quotes/queries';
import type { PaymentKind } from '$lib/server/quotes/queries';
import { RuleError } from '$lib/server/errors';
import * as links from './links';

/**
 * The shop's name for a mail. Inside a transaction it must be read through that transaction: on
 * PGlite a second query outside it would wait for the transaction forever.
 */
async function shopInfo(tx?: Tx): Promise<ShopInfo> {
	if (!tx) return { name: (await getShop()).name, locale: 'en-GB' };
	const [row] = await tx.select().from(settingsTable).where(eq(settingsTable.key, 'shop'));
	const parsed = shopSchema.safeParse(row?.value);
	return { name: parsed.success ? parsed.data.name : 'Tidemark', locale: 'en-GB' };
}

async function customerOf(tx: Tx, job: Job) {
	const [c] = await tx.select().from(customers).where(eq(customers.id, job.customerId));
	return c;
}

/** Whether the customer's page has findings (a finished run's verdict) and photos to show. */
async function pageContents(tx: Tx, jobId: string) {
	const [finished] = await tx
		.select({ id: runs.id })
		.from(runs)
		.where(and(eq(runs.jobId, jobId), eq(runs.status, 'completed'), isNotNull(runs.verdictStep)))
		.limit(1);
	const [photo] = await tx
		.select({ id: attachments.id })
		.from(attachments)
		.where(and(eq(attachments.jobId, jobId), eq(attachments.shownToCustomer, true)))
		.limit(1);
	return { findings: Boolean(finished), photos: Boolean(photo) };
}

/**
 * "Send report": a new private link, the current draft quote marked sent, the report mail queued,
 * and a job in diagnosis with a quote to decide moved to awaiting approval — all or nothing. The
 * mail says what the page holds now: before findings or a quote, that the phone is being examined. Returns the link so the
 * sender can also read it out or text it.
 */
export async function sendReport(actorId: string, jobId: string) {
	const [settings, shop] = await Promise.all([getReport(), shopInfo()]);
	const { transition, lockJob } = await import('$lib/server/jobs/queries');
	const db = await getDb();
	return db.transaction(async (tx) => {
		const job: Job = await lockJob(tx, jobId); // 404 'No job with this id.' when there is none
		if (job.status === 'collected' || job.status === 'cancelled')
			throw new RuleError(409, 'closed', 'This job is closed; its report can no longer be sent.');
		const customer = await customerOf(tx, job);
		if (!customer.email)
			throw new RuleError(
				409,
				'no-email',
				'The customer gave no e-mail address. Print the report for them, or add an address first.'
			);
		const quote = await quoteQueries.markSent(tx, jobId);
		const { token, link } = await links.create(tx, jobId, actorId, settings.linkLifetimeDays);
		const url = absoluteUrl(`/r/${token}`);
		const mail = reportReady({
			shop,
			customerName: customer.name,
			jobNumber: formatJobNumber(job.number),
			device: `${job.maker} ${job.model}`,
			reportUrl: url,
			expiresAt: link.expiresAt,
			has: { ...(await pageContents(tx, jobId)), quote: quote !== null }
		});
		await enqueue(tx, { to: customer.email, ...mail, related: { type: 'job', id: jobId } });
		// Awaiting approval means a quote is waiting on the customer; without one the job stays put.
		if (job.status === 'diagnosing' && quote)
			await transition(jobId, 'awaiting-approval', actorId, 'Report sent to the customer', tx);
		await record(tx, {
			actorId,
			action: 'report.send',
			targetType: 'job',
			targetId: jobId,
			details: { linkId: link.id, quoteId: quote?.id ?? null }
		});
		return { url, link, quote };
	});
}

/**
 * Opens a hosted checkout for what the customer chose to pay, or refuses (nothing due, already
 * paid, quote not approved). `returnPath` is the customer's page, where they come back to.
 */
export async function startPayment(jobId: string, quoteId: string, kind: PaymentKind, returnPath: string) {
	const versions = await quoteQueries.listForJob(jobId);
	const quote = quoteQueries.customerVisible(versions);
	if (!quote || quote.id !== quoteId)
		throw new RuleError(
			409,
			'not-open',
			'This quote has changed since the page was opened. Reload the page.'
		);
	const paid = await quoteQueries.receivedForJob(jobId);
	const option = quoteQueries.paymentOptions(quote, paid).find((o) => o.kind === kind);
	if (!option)
		throw new RuleError(
			409,
			'nothing-due',
			paid >= quote.grossMinor
				? 'This quote is already paid in full.'
				: 'There is nothing of that kind to pay now.'
		);
	const [job] = await (await getDb()).select().from(jobs).where(eq(jobs.id, jobId));
	return createCheckout({
		amountMinor: option.amountMinor,
		currency: quote.currency,
		description: `${kind === 'fee' ? 'Diagnostic fee' : 'Repair quote'}, job ${formatJobNumber(job.number)}`,
		reference: { type: 'job', id: quoteQueries.paymentReference(jobId, quote.id, kind) },
		successUrl: absoluteUrl(`${returnPath}?paid=1`),
		cancelUrl: absoluteUrl(returnPath)
	});
}

/**
 * Webhook effect for job payments (payments/changes.ts calls it), inside the webhook's transaction: the quote's paid amount
 * follows the payment (a confirmed refund takes its amount back), and a receipt is queued for a
 * confirmed payment, a refund notice for a confirmed refund.
 */
export async function applyJobPayment(
	tx: Tx,
	payment: Payment,
	previous: PaymentStatus,
	refund?: RefundChange
) {
	const ref = quoteQueries.parsePaymentReference(payment.referenceId);
	if (!ref) return;
	const delta = refund
		? -refund.amountMinor
		: payment.status === 'paid' && previous !== 'paid'
			? payment.amountMinor
			: 0;
	if (delta === 0) return;
	const [quote] = await tx
		.update(quotes)
		.set({
			paidMinor: sql`greatest(${quotes.paidMinor} + ${delta}, 0)`,
			updatedAt: new Date()
		})
		.where(eq(quotes.id, ref.quoteId))
		.returning();
	if (!quote || quote.jobId !== ref.jobId) throw new Error(`Payment ${payment.id} names an unknown quote.`);
	const paidTotal = await quoteQueries.paidForJob(ref.jobId, tx);
	await tx
		.update(quotes)
		.set({ paidAt: paidTotal >= quote.grossMinor ? (quote.paidAt ?? new Date()) : null })
		.where(eq(quotes.id, quote.id));
	await record(tx, {
		actorId: null,
		action: delta > 0 ? 'quote.paid' : 'quote.refunded',
		targetType: 'job',
		targetId: ref.jobId,
		details: {
			paymentId: payment.id,
			quoteId: quote.id,
			amountMinor: Math.abs(delta),
			paidTotal,
			...(refund ? { refundId: refund.refundId } : {})
		}
	});
	// A confirmed refund tells the customer; a refund that failed later (money back to the job) does not.
	if (refund && delta > 0) return;
	const [job] = await tx.select().from(jobs).where(eq(jobs.id, ref.jobId));
	const customer = await customerOf(tx, job);
	if (!customer?.email) return;
	if (refund) {
		const notice = refundNotice({
			shop: await shopInfo(tx),
			customerName: customer.name,
			jobNumber: formatJobNumber(job.number),
			description: payment.description,
			amountMinor: refund.amountMinor,
			currency: payment.currency,
			refundedAt: new Date(),
			paymentRef: payment.id
		});
		await enqueue(tx, { to: customer.email, ...notice, related: { type: 'job', id: ref.jobId } });
		return;
	}
	const mail = paymentReceipt({
		shop: await shopInfo(tx),
		customerName: customer.name,
		jobNumber: formatJobNumber(job.number),
		description: payment.description,
		amountMinor: payment.amountMinor,
		currency: payment.currency,
		paidAt: payment.paidAt ?? new Date(),
		paymentRef: payment.id
	});
	await enqueue(tx, { to: customer.email, ...mail, related: { type: 'job', id: ref.jobId } });
}

/**
 * Queues "ready to collect" when a job reaches `ready` (called from jobs.transition inside its
 * transaction). Without an e-mail address there is nothing to send.
 */
export async function queueReadyToCollect(tx: Tx, job: Job) {
	const customer = await customerOf(tx, job);
	if (!customer?.email) return;
	const quote = quoteQueries.customerVisible(await quoteQueries.listForJob(job.id, tx));
	const paid = await quoteQueries.receivedForJob(job.id, tx);
	const due = quote && quote.status === 'approved' ? Math.max(quote.grossMinor - paid, 0) : 0;
	const mail = readyToCollect({
		shop: await shopInfo(tx),
		customerName: customer.name,
		jobNumber: formatJobNumber(job.number),
		device: `${job.maker} ${job.model}`,
		amountDueMinor: due,
		currency: quote?.currency
	});
	await enqueue(tx, { to: customer.email, ...mail, related: { type: 'job', id: job.id } });
}
