import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { RuleError } from '$lib/server/errors';
import { eq } from 'drizzle-orm';
import Stripe from 'stripe';
import { PgTransaction } from 'drizzle-orm/pg-core';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { paymentEvents, payments } from '$lib/server/db/schema/payments';
import type { FakePayments } from '$lib/server/fakes/payments';
import { MAX_MINOR } from '$lib/domain/money';
import { createCheckout } from './checkout';
import { applyJobPayment } from '$lib/server/reports/customer';
import { pay, postWebhook, signer, startWebhookHarness } from './fixtures';

// The job effect as it is, watched: which changes the webhook hands to it.
vi.mock('$lib/server/reports/customer', async (importOriginal) => {
	const real = await importOriginal<typeof import('$lib/server/reports/customer')>();
	return { ...real, applyJobPayment: vi.fn(real.applyJobPayment) };
});

// End to end in node: the official SDK creates sessions at the local fake (started the way the app
// starts it), the fake's checkout page is "clicked" over HTTP, and the fake posts its signed
// webhook to a server in this test that hands the body to the webhook's processing (the route
// itself, a thin wrapper, has its own spec beside it).

let harness: Awaited<ReturnType<typeof startWebhookHarness>>;
let fake: FakePayments;

async function row(id: string) {
	const db = await getDb();
	const [r] = await db.select().from(payments).where(eq(payments.id, id));
	return r;
}

async function eventCount() {
	const db = await getDb();
	return (await db.select().from(paymentEvents)).length;
}

const checkout = (ref: string, amountMinor = 4950) =>
	createCheckout({
		amountMinor,
		currency: 'EUR',
		description: 'Diagnostic fee, job J-0042',
		reference: { type: 'job', id: ref },
		successUrl: 'http://app.test/r/tok?paid={CHECKOUT_SESSION_ID}',
		cancelUrl: 'http://app.test/r/tok'
	});

beforeAll(async () => {
	harness = await startWebhookHarness();
	fake = harness.fake;
});

afterAll(() => harness?.stop());

describe('checkout through the SDK and the local fake', () => {
	it('creates a pending payment and a session whose page shows the amount', async () => {
		const { url, paymentId, sessionId } = await checkout('J-1');
		expect(url).toBe(`${fake.url}/pay/${sessionId}`);
		expect(await row(paymentId)).toMatchObject({
			status: 'pending',
			amountMinor: 4950,
			currency: 'eur',
			providerSessionId: sessionId,
			paidAt: null
		});
		// What the SDK sent arrived intact (form-encoded line items, metadata, idempotency key).
		expect(fake.sessions.get(sessionId)).toMatchObject({
			amount_total: 4950,
			currency: 'eur',
			client_reference_id: paymentId,
			metadata: { reference_id: 'J-1' }
		});
		const html = await (await fetch(url)).text();
		expect(html).toContain('€49.50');
		expect(html).toContain('Diagnostic fee, job J-0042');
	});

	it('marks the payment paid when the customer pays: signed webhook, applied once', async () => {
		const { url, paymentId, sessionId } = await checkout('J-2');
		const res = await pay(url, 'succeed');
		expect(res.status).toBe(303);
		expect(res.headers.get('location')).toBe(`http://app.test/r/tok?paid=${sessionId}`);
		expect(fake.deliveries.at(-1)).toMatchObject({ type: 'checkout.session.completed', status: 200 });
		const paid = await row(paymentId);
		expect(paid.status).toBe('paid');
		expect(paid.paidAt).toBeInstanceOf(Date);
		const db = await getDb();
		const [ev] = await db.select().from(paymentEvents).where(eq(paymentEvents.paymentId, paymentId));
		expect(ev).toMatchObject({ type: 'checkout.session.completed', outcome: 'applied: paid' });
		const audit = await db.select().from(auditLog).where(eq(auditLog.targetId, paymentId));
		expect(audit.map((a) => a.action)).toEqual(['payment.paid']);
	});

	it('marks a declined payment failed, and a cancelled checkout failed as expired', async () => {
		const declined = await checkout('J-3');
		const res = await pay(declined.url, 'decline');
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('Payment declined');
		expect(await row(declined.paymentId)).toMatchObject({
			status: 'failed',
			failureReason: 'The payment was declined.',
			paidAt: null
		});

		const cancelled = await checkout('J-4');
		const back = await pay(cancelled.url, 'cancel');
		expect(back.headers.get('location')).toBe('http://app.test/r/tok');
		expect(await row(cancelled.paymentId)).toMatchObject({
			status: 'failed',
			failureReason: 'The checkout expired before payment.'
		});
		// A closed checkout cannot be paid afterwards.
		const again = await fetch(cancelled.url, {
			method: 'POST',
			body: new URLSearchParams({ outcome: 'succeed' }),
			redirect: 'manual'
		});
		expect(again.status).toBe(409);
		expect((await row(cancelled.paymentId)).status).toBe('failed');
	});

	it('offers the still-open checkout again instead of opening a second one', async () => {
		const first = await checkout('J-5');
		const second = await checkout('J-5');
		expect(second).toEqual(first);
		const db = await getDb();
		expect(await db.select().from(payments).where(eq(payments.referenceId, 'J-5'))).toHaveLength(1);
	});

	it('refuses to take a second payment for something already paid', async () => {
		const { url } = await checkout('J-6');
		await pay(url, 'succeed');
		await expect(checkout('J-6')).rejects.toThrow(RuleError);
	});

	it('refuses negative, fractional and absurd amounts before anything is created', async () => {
		const db = await getDb();
		const before = (await db.select().from(payments)).length;
		for (const amountMinor of [-500, 0, 12.5, MAX_MINOR + 1])
			await expect(checkout('J-7', amountMinor)).rejects.toThrow();
		expect((await db.select().from(payments)).length).toBe(before);
		expect(fake.sessions.size).toBeGreaterThan(0);
	});

	it('hands a job payment’s change to the job code inside the webhook transaction', async () => {
		vi.mocked(applyJobPayment).mockClear();
		const { url } = await checkout('J-8');
		await pay(url, 'succeed');
		const calls = vi.mocked(applyJobPayment).mock.calls;
		expect(calls.map(([, p, previous]) => `${p.referenceId}:${previous}->${p.status}`)).toEqual([
			'J-8:pending->paid'
		]);
		expect(calls[0][0]).toBeInstanceOf(PgTransaction);
	});

	it('is refused by the fake with a wrong key, as the service refuses it', async () => {
		const wrong = new Stripe('sk_test_wrong', {
			host: fake.host,
			port: fake.port,
			protocol: 'http',
			maxNetworkRetries: 0
		});
		await expect(wrong.checkout.sessions.retrieve('cs_test_x')).rejects.toBeInstanceOf(
			Stripe.errors.StripeAuthenticationError
		);
	});
});

describe('webhook signature', () => {
	/** A completed-session event for an existing pending payment, as the service would send it. */
	async function completedEvent(ref: string, amount_total = 4950) {
		const { paymentId, sessionId } = await checkout(ref);
		const event = {
			id: `evt_test_${ref}`,
			object: 'event',
			type: 'checkout.session.completed',
			created: Math.floor(Date.now() / 1000),
			data: {
				object: { ...fake.sessions.get(sessionId)!, status: 'complete', payment_status: 'paid', amount_total }
			}
		};
		return { paymentId, payload: JSON.stringify(event) };
	}

	it('refuses an unsigned call with 400 and changes nothing', async () => {
		const { paymentId, payload } = await completedEvent('S-1');
		const before = await eventCount();
		expect(await postWebhook(payload, null)).toMatchObject({
			status: 400,
			body: { received: false, message: 'Missing signature.' }
		});
		expect((await row(paymentId)).status).toBe('pending');
		expect(await eventCount()).toBe(before);
	});

	it('refuses a call signed with another secret, or a body changed after signing', async () => {
		const { paymentId, payload } = await completedEvent('S-2');
		const before = await eventCount();
		const wrongSecret = signer.webhooks.generateTestHeaderString({ payload, secret: 'whsec_not_ours' });
		expect((await postWebhook(payload, wrongSecret)).status).toBe(400);
		const good = signer.webhooks.generateTestHeaderString({ payload, secret: fake.webhookSecret });
		const tampered = payload.replace('"amount_total":4950', '"amount_total":1');
		expect(tampered).not.toBe(payload);
		expect(await postWebhook(tampered, good)).toMatchObject({
			status: 400,
			body: { message: 'Bad signature.' }
		});
		expect(await postWebhook(payload, 't=1,v1=garbage')).toMatchObject({ status: 400 });
		expect((await row(paymentId)).status).toBe('pending');
		expect(await eventCount()).toBe(before);
	});

	it('refuses a replay of an old signed call (older than the SDK’s 300 s tolerance)', async () => {
		// Source: the SDK's DEFAULT_TOLERANCE of 300 seconds (stripe-node Webhooks, constructEvent).
		const { paymentId, payload } = await completedEvent('S-3');
		const old = signer.webhooks.generateTestHeaderString({
			payload,
			secret: fake.webhookSecret,
			timestamp: Math.floor(Date.now() / 1000) - 301
		});
		expect((await postWebhook(payload, old)).status).toBe(400);
		expect((await row(paymentId)).status).toBe('pending');
		const fresh = signer.webhooks.generateTestHeaderString({
			payload,
			secret: fake.webhookSecret,
			timestamp: Math.floor(Date.now() / 1000) - 240
		});
		expect((await postWebhook(payload, fresh)).status).toBe(200);
		expect((await row(paymentId)).status).toBe('paid');
	});

	it('applies a duplicate delivery or a replay within the tolerance only once', async () => {
		const { url, paymentId } = await checkout('S-4');
		await pay(url, 'succeed');
		const delivered = fake.deliveries.at(-1)!;
		const db = await getDb();
		const auditBefore = (await db.select().from(auditLog).where(eq(auditLog.targetId, paymentId))).length;
		const eventsBefore = await eventCount();
		const paidAt = (await row(paymentId)).paidAt;

		const again = await fake.redeliver(delivered.eventId);
		expect(again.status).toBe(200);
		const direct = await postWebhook(...(await resignedSame(delivered.eventId)));
		expect(direct).toMatchObject({ status: 200, body: { received: true, duplicate: true } });

		expect(await eventCount()).toBe(eventsBefore);
		expect((await db.select().from(auditLog).where(eq(auditLog.targetId, paymentId))).length).toBe(
			auditBefore
		);
		expect((await row(paymentId)).paidAt).toEqual(paidAt);
	});

	it('does not mark paid when the paid amount differs from the payment', async () => {
		const { paymentId, payload } = await completedEvent('S-5', 100);
		const header = signer.webhooks.generateTestHeaderString({ payload, secret: fake.webhookSecret });
		expect(await postWebhook(payload, header)).toMatchObject({
			status: 200,
			body: { outcome: 'refused: amount or currency differs from the payment' }
		});
		expect((await row(paymentId)).status).toBe('pending');
	});

	it('records an event of a type it does not use, and ignores it', async () => {
		const payload = JSON.stringify({
			id: 'evt_test_other',
			object: 'event',
			type: 'customer.created',
			created: 1,
			data: { object: {} }
		});
		const header = signer.webhooks.generateTestHeaderString({ payload, secret: fake.webhookSecret });
		expect(await postWebhook(payload, header)).toMatchObject({
			status: 200,
			body: { outcome: 'ignored: customer.created' }
		});
	});

	/** The exact event the fake delivered, re-signed now with the right secret (a replay by someone holding it). */
	async function resignedSame(eventId: string): Promise<[string, string]> {
		const event = fake.events.find((e) => e.id === eventId)!;
		const payload = JSON.stringify(event);
		return [payload, signer.webhooks.generateTestHeaderString({ payload, secret: fake.webhookSecret })];
	}
});
