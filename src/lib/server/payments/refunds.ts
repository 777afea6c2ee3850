// Over 300 lines on purpose: one thing, a refund's life from the lead's request to the service's signed answer.
/**
 * Refunds of paid payments. A lead asks (`requestRefund`): the refund is written as pending — it
 * counts against what is left, so two requests cannot together pass the amount paid — and created
 * at the service through the SDK. Only the service's signed refund webhook (`applyRefund`, inside
 * the webhook's transaction) confirms it and adds it to `payments.refunded_minor`, once per refund.
 */
import { RuleError } from '$lib/server/errors';
import { and, asc, eq, inArray, or, sql } from 'drizzle-orm';
import type Stripe from 'stripe';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { getDb, type Tx } from '$lib/server/db';
import { paymentRefunds, payments, type Payment } from '$lib/server/db/schema/payments';
import { record } from '$lib/server/audit';
import { MAX_MINOR, formatMoney } from '$lib/domain/money';
import { applyPaymentChange } from './changes';
import { paymentsClient } from './config';
import type { Applied } from './webhook';

const uuid = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const money = (minor: number, currency: string) => formatMoney(minor, currency.toUpperCase(), 'en-GB');

export const refundInputSchema = z.object({
	paymentId: z.uuid(),
	amountMinor: z
		.number()
		.int('Amounts are whole minor units (cents).')
		.min(1, 'The refund must be more than zero.')
		.max(MAX_MINOR),
	reason: text('The reason').trim().max(500, 'Keep the reason under 500 characters.').default(''),
	/** The payment must belong to this: reference type and the start of its reference id. */
	scope: z.object({ type: z.string().min(1), idPrefix: z.string().min(1) })
});
export type RefundInput = z.input<typeof refundInputSchema>;

/** A payment the caller may refund (it belongs to `scope`), or null. */
export async function paymentInScope(paymentId: string, scope: RefundInput['scope'], tx?: Tx) {
	if (!uuid.test(paymentId)) return null;
	const d = tx ?? (await getDb());
	const q = d.select().from(payments).where(eq(payments.id, paymentId));
	const [p] = tx ? await q.for('update') : await q;
	return p && p.referenceType === scope.type && p.referenceId.startsWith(scope.idPrefix) ? p : null;
}

/** Pending refunds hold their amount until the service answers. */
async function heldMinor(tx: Tx, paymentId: string) {
	const [{ held }] = await tx
		.select({ held: sql<number>`coalesce(sum(${paymentRefunds.amountMinor}), 0)::int` })
		.from(paymentRefunds)
		.where(and(eq(paymentRefunds.paymentId, paymentId), eq(paymentRefunds.status, 'pending')));
	return held;
}

/**
 * Records a lead's refund and creates it at the service. Refuses (RuleError, nothing
 * changed) a payment of another job, one that is not paid, and any amount beyond what is left
 * (paid − refunded − still pending). Returns the pending refund; the webhook confirms it.
 */
export async function requestRefund(actorId: string, input: RefundInput) {
	const data = refundInputSchema.parse(input);
	const client = paymentsClient();
	const db = await getDb();
	const { refund, payment } = await db.transaction(async (tx) => {
		const payment = await paymentInScope(data.paymentId, data.scope, tx);
		if (!payment) throw new RuleError(404, 'not-found', 'No such payment on this job.');
		if (payment.status !== 'paid')
			throw new RuleError(
				400,
				'not-paid',
				payment.status === 'refunded'
					? 'This payment has already been refunded in full.'
					: 'Only a paid payment can be refunded.'
			);
		const held = await heldMinor(tx, payment.id);
		const left = payment.amountMinor - payment.refundedMinor - held;
		if (data.amountMinor > left) {
			const m = (x: number) => money(x, payment.currency);
			const parts = [`${m(payment.amountMinor)} paid`, `${m(payment.refundedMinor)} refunded`];
			if (held) parts.push(`${m(held)} waiting for the payment service`);
			throw new RuleError(
				400,
				'too-much',
				left <= 0
					? `Nothing is left to refund on this payment (${parts.join(', ')}).`
					: `At most ${m(left)} can be refunded: ${parts.join(', ')}.`
			);
		}
		const [refund] = await tx
			.insert(paymentRefunds)
			.values({
				paymentId: payment.id,
				amountMinor: data.amountMinor,
				currency: payment.currency,
				reason: data.reason || null,
				requestedBy: actorId
			})
			.returning();
		await record(tx, {
			actorId,
			action: 'payment.refund-requested',
			targetType: 'payment',
			targetId: payment.id,
			details: {
				refundId: refund.id,
				amountMinor: refund.amountMinor,
				currency: refund.currency,
				reason: refund.reason,
				referenceId: payment.referenceId
			}
		});
		return { refund, payment };
	});

	try {
		let intent: string | null | undefined = payment.providerPaymentIntent;
		if (!intent && payment.providerSessionId) {
			const session = await client.checkout.sessions.retrieve(payment.providerSessionId);
			intent =
				typeof session.payment_intent === 'string' ? session.payment_intent : session.payment_intent?.id;
		}
		if (!intent) throw new Error('the payment service has no payment for this checkout.');
		const created = await client.refunds.create(
			{
				payment_intent: intent,
				amount: refund.amountMinor,
				reason: 'requested_by_customer',
				metadata: { refund_id: refund.id, payment_id: payment.id }
			},
			// Our row's id: a retried request cannot refund twice.
			{ idempotencyKey: `refund-${refund.id}` }
		);
		await db
			.update(paymentRefunds)
			.set({ providerRefundId: created.id, updatedAt: new Date() })
			.where(and(eq(paymentRefunds.id, refund.id), sql`${paymentRefunds.providerRefundId} is null`));
		return refund;
	} catch (e) {
		const reason = (e instanceof Error ? e.message : String(e)).slice(0, 500);
		await db.transaction(async (tx) => {
			const [failed] = await tx
				.update(paymentRefunds)
				.set({ status: 'failed', failureReason: reason, updatedAt: new Date() })
				.where(and(eq(paymentRefunds.id, refund.id), eq(paymentRefunds.status, 'pending')))
				.returning();
			if (failed)
				await record(tx, {
					actorId,
					action: 'payment.refund-failed',
					targetType: 'payment',
					targetId: payment.id,
					details: { refundId: refund.id, reason }
				});
		});
		throw new RuleError(502, 'service', `The payment service did not refund: ${reason}`);
	}
}

/** Waits a little for the webhook to confirm a refund (the service usually answers within a second). */
export async function settled(refundId: string, timeoutMs = 3000) {
	const db = await getDb();
	const until = Date.now() + timeoutMs;
	for (;;) {
		const [r] = await db.select().from(paymentRefunds).where(eq(paymentRefunds.id, refundId));
		if (!r || r.status !== 'pending' || Date.now() >= until) return r;
		await new Promise((res) => setTimeout(res, 150));
	}
}

/** Refunds of these payments, oldest first. */
export async function listForPayments(paymentIds: string[]) {
	if (!paymentIds.length) return [];
	const db = await getDb();
	return db
		.select()
		.from(paymentRefunds)
		.where(inArray(paymentRefunds.paymentId, paymentIds))
		.orderBy(asc(paymentRefunds.createdAt));
}

async function paymentForRefund(tx: Tx, r: Stripe.Refund, known: string | null) {
	const ourId = known ?? (uuid.test(r.metadata?.payment_id ?? '') ? r.metadata!.payment_id : null);
	const intent = typeof r.payment_intent === 'string' ? r.payment_intent : r.payment_intent?.id;
	if (!ourId && !intent) return null;
	const [p] = await tx
		.select()
		.from(payments)
		.where(ourId ? eq(payments.id, ourId) : eq(payments.providerPaymentIntent, intent!))
		.for('update');
	return p ?? null;
}

/**
 * Webhook effect of `refund.created` / `refund.updated` / `refund.failed`. Finds our refund by the
 * service's id or the id we sent in its metadata (a refund made at the service itself is recorded
 * now, by its payment intent). A succeeded refund is applied once: a second event for the same
 * refund changes nothing; one that would take the refunds past the amount paid is refused and
 * audited. A refund that fails after it succeeded gives the amount back to the payment.
 */
export async function applyRefund(tx: Tx, event: Stripe.Event, r: Stripe.Refund): Promise<Applied> {
	const ourRefundId = uuid.test(r.metadata?.refund_id ?? '') ? r.metadata!.refund_id : null;
	let [row] = await tx
		.select()
		.from(paymentRefunds)
		.where(
			ourRefundId
				? or(eq(paymentRefunds.providerRefundId, r.id), eq(paymentRefunds.id, ourRefundId))
				: eq(paymentRefunds.providerRefundId, r.id)
		)
		.for('update');
	const payment = await paymentForRefund(tx, r, row?.paymentId ?? null);
	if (!payment) return { outcome: 'ignored: refund of an unknown payment', paymentId: null };
	const audit = (action: string, details: Record<string, unknown>) =>
		record(tx, {
			actorId: null,
			action,
			targetType: 'payment',
			targetId: payment.id,
			details: { eventId: event.id, providerRefundId: r.id, amountMinor: r.amount, ...details }
		});
	if (row && row.providerRefundId && row.providerRefundId !== r.id)
		return { outcome: 'ignored: refund does not match our record', paymentId: payment.id };
	if (r.currency !== payment.currency || (row && row.amountMinor !== r.amount)) {
		await audit('payment.refund-mismatch', { expected: [row?.amountMinor, payment.currency] });
		return { outcome: 'refused: refund amount or currency differs', paymentId: payment.id };
	}
	if (!row) {
		[row] = await tx
			.insert(paymentRefunds)
			.values({ paymentId: payment.id, amountMinor: r.amount, currency: r.currency, providerRefundId: r.id })
			.returning();
	} else if (!row.providerRefundId) {
		await tx.update(paymentRefunds).set({ providerRefundId: r.id }).where(eq(paymentRefunds.id, row.id));
	}

	const now = new Date();
	if (r.status === 'succeeded') {
		if (row.status === 'succeeded')
			return { outcome: 'ignored: refund already applied', paymentId: payment.id };
		const refunded = payment.refundedMinor + r.amount;
		if ((payment.status !== 'paid' && payment.status !== 'refunded') || refunded > payment.amountMinor) {
			const why =
				payment.status === 'paid' || payment.status === 'refunded'
					? `Refunds would exceed the ${money(payment.amountMinor, payment.currency)} paid.`
					: 'The payment is not paid.';
			await tx
				.update(paymentRefunds)
				.set({ status: 'failed', failureReason: why, updatedAt: now })
				.where(eq(paymentRefunds.id, row.id));
			await audit('payment.refund-refused', { refundId: row.id, reason: why });
			return { outcome: 'refused: refund exceeds what was paid', paymentId: payment.id };
		}
		await tx
			.update(paymentRefunds)
			.set({
				status: 'succeeded',
				failureReason: null,
				refundedAt: new Date(event.created * 1000),
				updatedAt: now
			})
			.where(eq(paymentRefunds.id, row.id));
		const updated = await setRefunded(tx, payment, refunded, now);
		await audit('payment.refunded', {
			refundId: row.id,
			requestedBy: row.requestedBy,
			refundedMinor: refunded,
			paymentMinor: payment.amountMinor,
			currency: payment.currency
		});
		await applyPaymentChange(tx, updated, payment.status, { refundId: row.id, amountMinor: r.amount });
		return { outcome: 'applied: refund', paymentId: payment.id };
	}
	if (r.status === 'failed' || r.status === 'canceled') {
		if (row.status === 'failed') return { outcome: 'ignored: refund already failed', paymentId: payment.id };
		const why = `The payment service reports the refund ${r.status}${r.failure_reason ? ` (${r.failure_reason})` : ''}.`;
		await tx
			.update(paymentRefunds)
			.set({ status: 'failed', failureReason: why, updatedAt: now })
			.where(eq(paymentRefunds.id, row.id));
		await audit('payment.refund-failed', {
			refundId: row.id,
			reason: why,
			wasApplied: row.status === 'succeeded'
		});
		if (row.status === 'succeeded') {
			const updated = await setRefunded(tx, payment, payment.refundedMinor - row.amountMinor, now);
			await applyPaymentChange(tx, updated, payment.status, {
				refundId: row.id,
				amountMinor: -row.amountMinor
			});
			return { outcome: 'applied: refund reversed', paymentId: payment.id };
		}
		return { outcome: 'applied: refund failed', paymentId: payment.id };
	}
	return { outcome: `noted: refund ${r.status}`, paymentId: payment.id };
}

async function setRefunded(tx: Tx, payment: Payment, refundedMinor: number, now: Date) {
	const [updated] = await tx
		.update(payments)
		.set({
			refundedMinor,
			status: refundedMinor >= payment.amountMinor ? 'refunded' : 'paid',
			updatedAt: now
		})
		.where(eq(payments.id, payment.id))
		.returning();
	return updated;
}

/** `charge.refunded` carries no refund to apply (the refund events do): note how far it agrees. */
export async function noteChargeRefunded(tx: Tx, charge: Stripe.Charge): Promise<Applied> {
	const intent =
		typeof charge.payment_intent === 'string' ? charge.payment_intent : charge.payment_intent?.id;
	if (!intent) return { outcome: 'ignored: charge without a payment intent', paymentId: null };
	const [payment] = await tx.select().from(payments).where(eq(payments.providerPaymentIntent, intent));
	if (!payment) return { outcome: 'ignored: charge of an unknown payment', paymentId: null };
	return {
		outcome: `noted: charge refunded ${charge.amount_refunded} of ${charge.amount}, applied ${payment.refundedMinor}`,
		paymentId: payment.id
	};
}
