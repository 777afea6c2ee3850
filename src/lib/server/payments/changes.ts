import type { Tx } from '$lib/server/db';
import type { Payment, PaymentStatus } from '$lib/server/db/schema/payments';
import { applyJobPayment } from '$lib/server/reports/customer';

/** A confirmed refund (amount > 0) or a refund the service later reported failed (amount < 0). */
export type RefundChange = { refundId: string; amountMinor: number };

/**
 * Called inside the webhook's transaction when a payment changes: its status (paid, failed), or its
 * refunded amount (`refund` set), so the domain it pays for records it and queues mail atomically
 * with the change. Jobs are the one domain that takes payments; a new one adds its call here.
 */
export async function applyPaymentChange(
	tx: Tx,
	payment: Payment,
	previous: PaymentStatus,
	refund?: RefundChange
) {
	if (payment.referenceType === 'job') await applyJobPayment(tx, payment, previous, refund);
}
