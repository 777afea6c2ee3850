import { isUuid } from '$lib/schemas/ids';
import { eq, or } from 'drizzle-orm';
import Stripe from 'stripe';
import { getDb, type Tx } from '$lib/server/db';
import { paymentEvents, payments } from '$lib/server/db/schema/payments';
import { record } from '$lib/server/audit';
import { applyPaymentChange } from './changes';
import { paymentsClient, paymentsConfig } from './config';
import { applyRefund, noteChargeRefunded } from './refunds';

export type WebhookResponse = { received: boolean; duplicate?: boolean; outcome?: string; message?: string };
export type WebhookResult = { status: number; body: WebhookResponse };

const refuse = (message: string): WebhookResult => ({ status: 400, body: { received: false, message } });

/**
 * Verifies, records and applies one webhook delivery. A missing or bad signature (or one older
 * than the SDK's five-minute tolerance) is refused with 400 and changes nothing. Each event id is
 * applied once: it is recorded in the same transaction as its effect, so a duplicate or replayed
 * delivery finds it and is a no-op (200, so the service stops resending).
 */
export async function processWebhook(rawBody: string, signature: string | null): Promise<WebhookResult> {
	const config = paymentsConfig();
	if (!config?.webhookSecret) {
		return { status: 503, body: { received: false, message: 'Payments are not set up on this server.' } };
	}
	if (!signature) return refuse('Missing signature.');
	let event: Stripe.Event;
	try {
		event = paymentsClient().webhooks.constructEvent(rawBody, signature, config.webhookSecret);
	} catch (e) {
		if (e instanceof Stripe.errors.StripeSignatureVerificationError) return refuse('Bad signature.');
		return refuse('Unreadable event.');
	}

	const db = await getDb();
	return db.transaction(async (tx) => {
		const [fresh] = await tx
			.insert(paymentEvents)
			.values({ eventId: event.id, type: event.type, outcome: 'received' })
			.onConflictDoNothing()
			.returning({ eventId: paymentEvents.eventId });
		if (!fresh) return { status: 200, body: { received: true, duplicate: true } };

		const { outcome, paymentId } = await apply(tx, event);
		await tx.update(paymentEvents).set({ outcome, paymentId }).where(eq(paymentEvents.eventId, event.id));
		return { status: 200, body: { received: true, outcome } };
	});
}

export type Applied = { outcome: string; paymentId: string | null };

async function apply(tx: Tx, event: Stripe.Event): Promise<Applied> {
	switch (event.type) {
		case 'checkout.session.completed':
		case 'checkout.session.async_payment_succeeded': {
			const session = event.data.object;
			if (session.payment_status !== 'paid')
				return { outcome: `ignored: payment_status ${session.payment_status}`, paymentId: null };
			return change(tx, event, session, 'paid');
		}
		case 'checkout.session.async_payment_failed':
			return change(tx, event, event.data.object, 'failed', 'The payment was declined.');
		case 'checkout.session.expired':
			return change(tx, event, event.data.object, 'failed', 'The checkout expired before payment.');
		// A refund is applied from the refund's own events, once per refund whichever arrives first;
		// `charge.refunded` (sent beside them) only says how much of the charge is refunded so far.
		case 'refund.created':
		case 'refund.updated':
		case 'refund.failed':
			return applyRefund(tx, event, event.data.object);
		case 'charge.refunded':
			return noteChargeRefunded(tx, event.data.object);
		default:
			return { outcome: `ignored: ${event.type}`, paymentId: null };
	}
}

async function change(
	tx: Tx,
	event: Stripe.Event,
	session: Stripe.Checkout.Session,
	to: 'paid' | 'failed',
	reason?: string
): Promise<Applied> {
	const ourId = session.metadata?.payment_id ?? session.client_reference_id ?? null;
	const [payment] = await tx
		.select()
		.from(payments)
		.where(
			ourId && isUuid(ourId)
				? or(eq(payments.providerSessionId, session.id), eq(payments.id, ourId))
				: eq(payments.providerSessionId, session.id)
		)
		.for('update');
	if (!payment) return { outcome: 'ignored: unknown checkout session', paymentId: null };
	if (payment.providerSessionId && payment.providerSessionId !== session.id) {
		return { outcome: 'ignored: session does not match the payment', paymentId: payment.id };
	}
	if (payment.status === 'paid' || payment.status === 'refunded') {
		return { outcome: `ignored: already ${payment.status}`, paymentId: payment.id };
	}
	if (
		to === 'paid' &&
		(session.amount_total !== payment.amountMinor || session.currency !== payment.currency)
	) {
		await record(tx, {
			actorId: null,
			action: 'payment.mismatch',
			targetType: 'payment',
			targetId: payment.id,
			details: {
				eventId: event.id,
				expected: [payment.amountMinor, payment.currency],
				got: [session.amount_total, session.currency]
			}
		});
		return { outcome: 'refused: amount or currency differs from the payment', paymentId: payment.id };
	}
	if (to === 'failed' && payment.status === 'failed')
		return { outcome: 'ignored: already failed', paymentId: payment.id };

	const now = new Date();
	const [updated] = await tx
		.update(payments)
		.set({
			status: to,
			providerSessionId: session.id,
			providerPaymentIntent:
				typeof session.payment_intent === 'string'
					? session.payment_intent
					: (session.payment_intent?.id ?? payment.providerPaymentIntent),
			paidAt: to === 'paid' ? new Date(event.created * 1000) : null,
			failureReason: to === 'failed' ? (reason ?? null) : null,
			updatedAt: now
		})
		.where(eq(payments.id, payment.id))
		.returning();
	await record(tx, {
		actorId: null,
		action: `payment.${to}`,
		targetType: 'payment',
		targetId: payment.id,
		details: {
			eventId: event.id,
			referenceType: payment.referenceType,
			referenceId: payment.referenceId,
			amountMinor: payment.amountMinor,
			currency: payment.currency
		}
	});
	await applyPaymentChange(tx, updated, payment.status);
	return { outcome: `applied: ${to}`, paymentId: payment.id };
}
