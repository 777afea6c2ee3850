/**
 * Quotes on a job: save (a draft in place, otherwise a new version), what the customer sees,
 * approve and decline by the customer, and what is still to pay. Totals always come from
 * quoteTotals() in $lib/domain/money with the tax settings copied onto the version.
 */
import { RuleError } from '$lib/server/errors';
import { isUuid } from '$lib/schemas/ids';
import { and, desc, eq, inArray, like, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { getDb, type DB, type Tx } from '$lib/server/db';
import { quotes, type Quote } from '$lib/server/db/schema/quotes';
import { payments } from '$lib/server/db/schema/payments';
import { record } from '$lib/server/audit';
import { lockJob } from '$lib/server/jobs/queries';
import { getMoney } from '$lib/server/settings/queries';
import { quoteLineSchema, quoteTotals, type QuoteLine } from '$lib/domain/money';

export const quoteInputSchema = z.object({
	lines: z.array(quoteLineSchema).min(1, 'Add at least one line.').max(40, 'At most 40 lines.'),
	proposal: text('The proposal').trim().max(5000, 'Keep the proposal under 5000 characters.').default('')
});
export type QuoteInput = z.input<typeof quoteInputSchema>;

export const customerNameSchema = text('Your name')
	.trim()
	.min(2, 'Type your full name.')
	.max(120, 'At most 120 characters.');

/** Every version of a job's quote, newest first. */
export async function listForJob(jobId: string, db?: DB | Tx): Promise<Quote[]> {
	const d = db ?? (await getDb());
	return d.select().from(quotes).where(eq(quotes.jobId, jobId)).orderBy(desc(quotes.version));
}

export async function latest(jobId: string, db?: DB | Tx): Promise<Quote | undefined> {
	return (await listForJob(jobId, db))[0];
}

/**
 * The version the customer sees: the newest one if it has been sent (or decided). A newer draft
 * means the shop is revising it, and the customer sees no price until it is sent again.
 */
export function customerVisible(versions: Quote[]): Quote | null {
	const newest = versions[0];
	return newest && newest.status !== 'draft' && newest.status !== 'superseded' ? newest : null;
}

/**
 * Saves the quote. A draft is changed in place; a version the customer has already been sent (or
 * has decided on) stays as it was, marked superseded, and the change becomes the next version.
 */
export async function save(actorId: string, jobId: string, input: QuoteInput): Promise<Quote> {
	const data = quoteInputSchema.parse(input);
	const money = await getMoney();
	let totals;
	try {
		totals = quoteTotals(data.lines, money);
	} catch (e) {
		if (e instanceof RangeError) throw new RuleError(400, 'invalid', `The quote was refused: ${e.message}.`);
		throw e;
	}
	const db = await getDb();
	return db.transaction(async (tx) => {
		await lockJob(tx, jobId);
		const current = await latest(jobId, tx);
		const values = {
			lines: data.lines,
			proposal: data.proposal,
			currency: money.currency,
			taxRateBasisPoints: money.taxRateBasisPoints,
			pricesIncludeTax: money.pricesIncludeTax,
			netMinor: totals.netMinor,
			taxMinor: totals.taxMinor,
			grossMinor: totals.grossMinor,
			updatedAt: new Date()
		};
		let saved: Quote;
		if (current?.status === 'draft') {
			[saved] = await tx.update(quotes).set(values).where(eq(quotes.id, current.id)).returning();
		} else {
			if (current)
				await tx
					.update(quotes)
					.set({ status: 'superseded', updatedAt: new Date() })
					.where(eq(quotes.id, current.id));
			[saved] = await tx
				.insert(quotes)
				.values({ ...values, jobId, version: (current?.version ?? 0) + 1, createdBy: actorId })
				.returning();
		}
		await record(tx, {
			actorId,
			action: 'quote.save',
			targetType: 'job',
			targetId: jobId,
			details: {
				quoteId: saved.id,
				version: saved.version,
				grossMinor: saved.grossMinor,
				currency: saved.currency
			}
		});
		return saved;
	});
}

/** Marks the newest draft sent (inside the send-report transaction); returns the quote the customer will see. */
export async function markSent(tx: Tx, jobId: string): Promise<Quote | null> {
	const current = await latest(jobId, tx);
	if (current?.status !== 'draft') return customerVisible(current ? [current] : []);
	const [sent] = await tx
		.update(quotes)
		.set({ status: 'sent', sentAt: new Date(), updatedAt: new Date() })
		.where(eq(quotes.id, current.id))
		.returning();
	return sent;
}

type Decision = { quote: Quote; changed: boolean };

/**
 * The customer approves (or declines) the quote they see, with their typed name. A second
 * approval of the same quote changes nothing; deciding on a quote that was decided otherwise,
 * or that is no longer the one shown, is refused.
 */
export async function decide(
	jobId: string,
	quoteId: string,
	decision: 'approved' | 'declined',
	name: string
): Promise<Decision> {
	const typed = customerNameSchema.safeParse(name);
	if (!typed.success) throw new RuleError(400, 'invalid', typed.error.issues[0].message, { field: 'name' });
	const db = await getDb();
	return db.transaction(async (tx) => {
		await lockJob(tx, jobId);
		const shown = customerVisible(await listForJob(jobId, tx));
		if (!shown || shown.id !== quoteId)
			throw new RuleError(
				409,
				'not-open',
				'This quote has changed since the page was opened. Reload the page to see the current one.'
			);
		if (shown.status === decision) return { quote: shown, changed: false };
		if (shown.status !== 'sent')
			throw new RuleError(
				409,
				'already-decided',
				`You have already ${shown.status} this quote. To change that, please call the shop.`
			);
		const now = new Date();
		const [updated] = await tx
			.update(quotes)
			.set(
				decision === 'approved'
					? { status: 'approved', approvedName: typed.data, approvedAt: now, updatedAt: now }
					: { status: 'declined', declinedName: typed.data, declinedAt: now, updatedAt: now }
			)
			.where(and(eq(quotes.id, quoteId), eq(quotes.status, 'sent')))
			.returning();
		await record(tx, {
			actorId: null,
			action: `quote.${decision}`,
			targetType: 'job',
			targetId: jobId,
			details: { quoteId, version: updated.version, name: typed.data }
		});
		return { quote: updated, changed: true };
	});
}

/** Payments are stored with reference ('job', `${jobId}:${quoteId}:${kind}`). */
export type PaymentKind = 'fee' | 'rest';
export const paymentReference = (jobId: string, quoteId: string, kind: PaymentKind) =>
	`${jobId}:${quoteId}:${kind}`;
export function parsePaymentReference(ref: string) {
	const m = /^([0-9a-f-]{36}):([0-9a-f-]{36}):(fee|rest)$/i.exec(ref);
	return m && isUuid(m[1]) && isUuid(m[2]) ? { jobId: m[1], quoteId: m[2], kind: m[3] as PaymentKind } : null;
}

/** Every payment of the job, whichever quote version it was for. */
const ofJob = (jobId: string) =>
	and(eq(payments.referenceType, 'job'), like(payments.referenceId, `${jobId}:%`));

/** The job's payments (every quote version), newest first. */
export async function paymentsForJob(jobId: string, db?: DB | Tx) {
	const d = db ?? (await getDb());
	return d.select().from(payments).where(ofJob(jobId)).orderBy(desc(payments.createdAt));
}

/** Σ `amount` over the job's confirmed payments (paid, or paid and then refunded). */
async function sumConfirmed(jobId: string, amount: SQL, db?: DB | Tx): Promise<number> {
	const d = db ?? (await getDb());
	const [{ total }] = await d
		.select({ total: sql<number>`coalesce(sum(${amount}), 0)::int` })
		.from(payments)
		.where(and(ofJob(jobId), inArray(payments.status, ['paid', 'refunded'])));
	return total;
}

/** Confirmed money in, minus confirmed refunds, over the whole job. */
export function paidForJob(jobId: string, db?: DB | Tx): Promise<number> {
	return sumConfirmed(jobId, sql`${payments.amountMinor} - ${payments.refundedMinor}`, db);
}

/**
 * Money received over the whole job, refunds not taken off: what counts against the quote's total
 * (a refunded amount is given back, not owed again).
 */
export function receivedForJob(jobId: string, db?: DB | Tx): Promise<number> {
	return sumConfirmed(jobId, sql`${payments.amountMinor}`, db);
}

export type PaymentOption = { kind: PaymentKind; amountMinor: number; label: string };

/**
 * What the customer may pay now: the diagnostic fee (the fee lines with their tax) while nothing
 * is paid yet, and once the quote is approved, the rest of the quote's total. `paidMinor` is the
 * money received (`receivedForJob`).
 */
export function paymentOptions(quote: Quote | null, paidMinor: number): PaymentOption[] {
	if (!quote || quote.status === 'draft' || quote.status === 'superseded') return [];
	const options: PaymentOption[] = [];
	const due = quote.grossMinor - paidMinor;
	if (quote.status === 'approved' && due > 0)
		options.push({
			kind: 'rest',
			amountMinor: due,
			label: paidMinor > 0 ? 'Pay the rest' : 'Pay the whole quote'
		});
	const feeLines = (quote.lines as QuoteLine[]).filter((l) => l.kind === 'fee');
	if (paidMinor === 0 && feeLines.length) {
		const fee = quoteTotals(feeLines, quote).grossMinor;
		if (fee > 0 && fee <= due && (quote.status !== 'approved' || fee < due))
			options.push({ kind: 'fee', amountMinor: fee, label: 'Pay the diagnostic fee' });
	}
	return options;
}
