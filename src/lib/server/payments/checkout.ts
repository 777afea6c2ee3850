import { RuleError } from '$lib/server/errors';
import { and, desc, eq } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '$lib/server/db';
import { payments } from '$lib/server/db/schema/payments';
import { MAX_MINOR } from '$lib/domain/money';
import { paymentsClient } from './config';

const httpUrl = z.url({ protocol: /^https?$/, message: 'A return address must be an http(s) URL.' });

export const checkoutInputSchema = z.object({
	amountMinor: z
		.number()
		.int('Amounts are whole minor units (cents).')
		.min(1, 'The amount must be more than zero.')
		.max(MAX_MINOR, 'That amount is beyond what one checkout may take.'),
	currency: z
		.string()
		.regex(/^[A-Za-z]{3}$/, 'A currency is a three-letter ISO 4217 code.')
		.transform((c) => c.toLowerCase()),
	description: z.string().trim().min(1).max(200),
	reference: z.object({
		type: z.string().regex(/^[a-z][a-z_-]{0,39}$/),
		id: z.string().min(1).max(100)
	}),
	successUrl: httpUrl,
	cancelUrl: httpUrl
});
export type CheckoutInput = z.input<typeof checkoutInputSchema>;
export type Checkout = { url: string; paymentId: string; sessionId: string };

/**
 * Starts a hosted checkout for one thing (e.g. a job's quote) and returns the page to send the
 * customer to. Only the signed webhook later marks the payment paid. Refuses a second payment for
 * something already paid; re-offers a still-open checkout for the same amount instead of opening
 * another. `{CHECKOUT_SESSION_ID}` in successUrl is filled in by the service.
 */
export async function createCheckout(input: CheckoutInput): Promise<Checkout> {
	const data = checkoutInputSchema.parse(input);
	const client = paymentsClient();
	const db = await getDb();
	const ref = and(
		eq(payments.referenceType, data.reference.type),
		eq(payments.referenceId, data.reference.id)
	);

	const earlier = await db.select().from(payments).where(ref).orderBy(desc(payments.createdAt));
	if (earlier.some((p) => p.status === 'paid'))
		throw new RuleError(409, 'already-paid', 'This has already been paid.');
	const open = earlier.find(
		(p) =>
			p.status === 'pending' &&
			p.amountMinor === data.amountMinor &&
			p.currency === data.currency &&
			p.providerSessionId
	);
	if (open) {
		const session = await client.checkout.sessions.retrieve(open.providerSessionId!);
		if (session.status === 'open' && session.url)
			return { url: session.url, paymentId: open.id, sessionId: session.id };
		if (session.status === 'expired') {
			await db
				.update(payments)
				.set({
					status: 'failed',
					failureReason: 'The checkout expired before payment.',
					updatedAt: new Date()
				})
				.where(and(eq(payments.id, open.id), eq(payments.status, 'pending')));
		}
	}

	const [payment] = await db
		.insert(payments)
		.values({
			referenceType: data.reference.type,
			referenceId: data.reference.id,
			description: data.description,
			amountMinor: data.amountMinor,
			currency: data.currency
		})
		.returning();

	try {
		const session = await client.checkout.sessions.create(
			{
				mode: 'payment',
				line_items: [
					{
						quantity: 1,
						price_data: {
							currency: data.currency,
							unit_amount: data.amountMinor,
							product_data: { name: data.description }
						}
					}
				],
				client_reference_id: payment.id,
				metadata: {
					payment_id: payment.id,
					reference_type: data.reference.type,
					reference_id: data.reference.id
				},
				success_url: data.successUrl,
				cancel_url: data.cancelUrl
			},
			// Our row's id: a retried request cannot open a second checkout for it.
			{ idempotencyKey: `checkout-${payment.id}` }
		);
		if (!session.url) throw new Error('The payment service returned a checkout without a page address.');
		await db
			.update(payments)
			.set({ providerSessionId: session.id, updatedAt: new Date() })
			.where(eq(payments.id, payment.id));
		return { url: session.url, paymentId: payment.id, sessionId: session.id };
	} catch (e) {
		const reason = e instanceof Error ? e.message.slice(0, 500) : String(e);
		await db
			.update(payments)
			.set({
				status: 'failed',
				failureReason: `Could not start the checkout: ${reason}`,
				updatedAt: new Date()
			})
			.where(eq(payments.id, payment.id));
		throw e;
	}
}

/** Payments for one thing, newest first (for that thing's page). */
export async function paymentsFor(type: string, id: string) {
	const db = await getDb();
	return db
		.select()
		.from(payments)
		.where(and(eq(payments.referenceType, type), eq(payments.referenceId, id)))
		.orderBy(desc(payments.createdAt));
}
