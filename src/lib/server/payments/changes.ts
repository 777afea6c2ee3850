import type { Tx } from '$lib/server/db';
import type { Payment, PaymentStatus } from '$lib/server/db/schema/payments';

/** A confirmed refund (amount > 0) or a refund the service later reported failed (amount < 0). */
export type RefundChange = { refundId: string; amountMinor: number };

/**
 * Called inside the webhook's transaction when a payment of `referenceType` changes: its status
 * (paid, failed), or its refunded amount (`refund` set), so a domain (e.g. jobs) can record it and
 * queue mail atomically with the change.
 */
export type PaymentChangeHandler = (
	tx: Tx,
	payment: Payment,
	previous: PaymentStatus,
	refund?: RefundChange
) => Promise<void>;

const handlers = new Map<string, PaymentChangeHandler[]>();

export function onPaymentChange(referenceType: string, handler: PaymentChangeHandler) {
	handlers.set(referenceType, [...(handlers.get(referenceType) ?? []), handler]);
	return () =>
		handlers.set(
			referenceType,
			(handlers.get(referenceType) ?? []).filter((h) => h !== handler)
		);
}

export async function notifyPaymentChange(
	tx: Tx,
	payment: Payment,
	previous: PaymentStatus,
	refund?: RefundChange
) {
	for (const handler of handlers.get(payment.referenceType) ?? [])
		await handler(tx, payment, previous, refund);
}
