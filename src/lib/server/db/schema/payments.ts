import { sql } from 'drizzle-orm';
import { check, index, integer, pgTable, text, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';
import { users } from './users';

export const paymentStatuses = ['pending', 'paid', 'failed', 'refunded'] as const;
export type PaymentStatus = (typeof paymentStatuses)[number];

/**
 * One hosted checkout: what it is for (`reference_type`/`reference_id`, e.g. 'job', id — plain
 * text so any domain can take payments), the amount in integer minor units, and where it stands.
 * No card data is ever stored: the payment service holds it; we keep its session id.
 */
export const payments = pgTable(
	'payments',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		referenceType: text('reference_type').notNull(),
		referenceId: text('reference_id').notNull(),
		description: text('description').notNull(),
		amountMinor: integer('amount_minor').notNull(),
		/** ISO 4217 code, lower case as the payment service writes it. */
		currency: text('currency').notNull(),
		status: text('status', { enum: paymentStatuses }).notNull().default('pending'),
		providerSessionId: text('provider_session_id'),
		/** The service's payment intent, from the paid webhook; refunds are made against it. */
		providerPaymentIntent: text('provider_payment_intent'),
		/** Confirmed refunds so far (integer minor units); the payment is 'refunded' once it equals the amount. */
		refundedMinor: integer('refunded_minor').notNull().default(0),
		/** Why a payment failed, as the service or our checks said it; shown to staff. */
		failureReason: text('failure_reason'),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		updatedAt: timestamptz('updated_at').notNull().defaultNow(),
		paidAt: timestamptz('paid_at')
	},
	(t) => [
		uniqueIndex('payments_provider_session_idx').on(t.providerSessionId),
		index('payments_reference_idx').on(t.referenceType, t.referenceId),
		check('payments_status_check', sql`${t.status} in ('pending', 'paid', 'failed', 'refunded')`),
		check('payments_amount_check', sql`${t.amountMinor} > 0`),
		check('payments_currency_check', sql`${t.currency} ~ '^[a-z]{3}$'`),
		check('payments_refunded_check', sql`${t.refundedMinor} >= 0 and ${t.refundedMinor} <= ${t.amountMinor}`)
	]
);

export const refundStatuses = ['pending', 'succeeded', 'failed'] as const;
export type RefundStatus = (typeof refundStatuses)[number];

/**
 * One refund of (part of) a paid payment. A lead's request is written first as 'pending' (it counts
 * against what is left to refund, so two requests cannot together exceed the payment); only the
 * service's signed refund webhook makes it 'succeeded' and adds it to `payments.refunded_minor`.
 * A refund made at the service itself arrives by webhook only and is recorded then.
 */
export const paymentRefunds = pgTable(
	'payment_refunds',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		paymentId: uuid('payment_id')
			.notNull()
			.references(() => payments.id),
		amountMinor: integer('amount_minor').notNull(),
		currency: text('currency').notNull(),
		/** The lead's reason, shown on the job; null for a refund made at the service. */
		reason: text('reason'),
		status: text('status', { enum: refundStatuses }).notNull().default('pending'),
		providerRefundId: text('provider_refund_id'),
		failureReason: text('failure_reason'),
		requestedBy: uuid('requested_by').references(() => users.id),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		updatedAt: timestamptz('updated_at').notNull().defaultNow(),
		refundedAt: timestamptz('refunded_at')
	},
	(t) => [
		uniqueIndex('payment_refunds_provider_idx').on(t.providerRefundId),
		index('payment_refunds_payment_idx').on(t.paymentId),
		check('payment_refunds_status_check', sql`${t.status} in ('pending', 'succeeded', 'failed')`),
		check('payment_refunds_amount_check', sql`${t.amountMinor} > 0`)
	]
);

/**
 * Each webhook event id the app has accepted, recorded in the same transaction as its effect: a
 * replayed or duplicate delivery finds its id here and changes nothing.
 */
export const paymentEvents = pgTable('payment_events', {
	eventId: text('event_id').primaryKey(),
	type: text('type').notNull(),
	paymentId: uuid('payment_id').references(() => payments.id),
	/** What the event did: 'applied', or why it was ignored. */
	outcome: text('outcome').notNull(),
	receivedAt: timestamptz('received_at').notNull().defaultNow()
});

export type Payment = typeof payments.$inferSelect;
export type PaymentEvent = typeof paymentEvents.$inferSelect;
export type PaymentRefund = typeof paymentRefunds.$inferSelect;
