/**
 * The job page's refund form (one per payment, superform id `refund-<paymentId>`). The amount is
 * typed in major units and checked against the payment's currency on the server
 * ($lib/quotes/input parseAmount), where the payment is known.
 */
import { z } from 'zod';
import { text } from './text';

export const refundForm = z.object({
	paymentId: z.uuid('Choose a payment.'),
	amount: text('The amount').max(30, 'Enter the amount as a number, e.g. 12.50.').default(''),
	reason: text('The reason').trim().max(500, 'Keep the reason under 500 characters.').default('')
});
export type RefundFields = z.infer<typeof refundForm>;

export const refundFormId = (paymentId: string) => `refund-${paymentId}`;
