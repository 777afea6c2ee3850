// Over 300 lines on purpose: a spec: every refund rule, end to end through the local payments fake.
import crypto from 'node:crypto';
import { RuleError } from '$lib/server/errors';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { paymentRefunds, payments } from '$lib/server/db/schema/payments';
import type { FakePayments } from '$lib/server/fakes/payments';
import * as staff from '$lib/server/staff/queries';
import { actions } from '../../../routes/(app)/jobs/[id]/+page.server';
import { applyJobPayment } from '$lib/server/reports/customer';
import { setFakePayments } from './config';
import { createCheckout } from './checkout';
import { requestRefund, settled } from './refunds';
import { pay, postWebhook, signer, startWebhookHarness } from './fixtures';

// The job effect as it is, watched: which refund changes the webhook hands to it.
vi.mock('$lib/server/reports/customer', async (importOriginal) => {
	const real = await importOriginal<typeof import('$lib/server/reports/customer')>();
	return { ...real, applyJobPayment: vi.fn(real.applyJobPayment) };
});

// Refunds end to end in node: a payment is paid on the local fake's checkout page, a lead's refund
// is created through the official SDK at the fake, and the fake posts its signed `refund.created`
// and `charge.refunded` events to a server here that hands them to the real webhook route.

let harness: Awaited<ReturnType<typeof startWebhookHarness>>;
let fake: FakePayments;
let leadId: string;
let techId: string;

const sign = (payload: string, secret = fake.webhookSecret) =>
	signer.webhooks.generateTestHeaderString({ payload, secret });

async function payment(id: string) {
	const db = await getDb();
	const [p] = await db.select().from(payments).where(eq(payments.id, id));
	return p;
}
async function refundRows(paymentId: string) {
	const db = await getDb();
	return db.select().from(paymentRefunds).where(eq(paymentRefunds.paymentId, paymentId));
}
async function auditActions(paymentId: string) {
	const db = await getDb();
	return (await db.select().from(auditLog).where(eq(auditLog.targetId, paymentId))).map((a) => a.action);
}

/** A paid payment of 120.00 EUR for job reference `${job}:…`, paid on the fake's checkout page. */
async function paid(job: string, amountMinor = 12000) {
	const { url, paymentId } = await createCheckout({
		amountMinor,
		currency: 'EUR',
		description: 'Repair quote',
		reference: { type: 'job', id: `${job}:q:rest` },
		successUrl: 'http://app.test/r/tok?paid=1',
		cancelUrl: 'http://app.test/r/tok'
	});
	await pay(url, 'succeed');
	const p = await payment(paymentId);
	expect(p.status).toBe('paid');
	expect(p.providerPaymentIntent).toMatch(/^pi_test_/);
	return p;
}

const refund = (paymentId: string, job: string, amountMinor: number, reason = '') =>
	requestRefund(leadId, { paymentId, amountMinor, reason, scope: { type: 'job', idPrefix: `${job}:` } });

/** A refund event as the service sends it, for a refund of `amount` on this payment. */
function refundEvent(p: { providerPaymentIntent: string | null }, amount: number, extra: object = {}) {
	return JSON.stringify({
		id: `evt_test_${crypto.randomUUID()}`,
		object: 'event',
		type: 'refund.created',
		created: Math.floor(Date.now() / 1000),
		data: {
			object: {
				id: `re_test_${crypto.randomUUID().slice(0, 8)}`,
				object: 'refund',
				amount,
				currency: 'eur',
				metadata: {},
				payment_intent: p.providerPaymentIntent,
				status: 'succeeded',
				...extra
			}
		}
	});
}

beforeAll(async () => {
	harness = await startWebhookHarness();
	fake = harness.fake;
	const person = (role: 'lead' | 'technician') =>
		staff.create(null, {
			name: role === 'lead' ? 'Ines Harrow' : 'Tomas Reyl',
			email: `${role}-${crypto.randomUUID()}@shop.test`,
			role,
			password: 'refund-password-1'
		});
	leadId = (await person('lead')).id;
	techId = (await person('technician')).id;
});

afterAll(() => harness?.stop());

describe('refunds through the SDK, the local fake and the signed webhook', () => {
	it('refunds part, then the rest: each confirmed by its webhook, audited, amounts in minor units', async () => {
		const p = await paid('RF-1');
		const first = await refund(p.id, 'RF-1', 4550, 'Screen part not needed');
		expect(first).toMatchObject({ status: 'pending', amountMinor: 4550, requestedBy: leadId });
		await fake.settled();
		expect((await settled(first.id))?.status).toBe('succeeded');
		// The fake refunded what the SDK asked for, against the payment's intent.
		const atService = [...fake.refunds.values()].find((r) => r.metadata.refund_id === first.id)!;
		expect(atService).toMatchObject({ amount: 4550, payment_intent: p.providerPaymentIntent });
		expect(fake.deliveries.slice(-2).map((d) => [d.type, d.status])).toEqual([
			['refund.created', 200],
			['charge.refunded', 200]
		]);
		expect(await payment(p.id)).toMatchObject({ status: 'paid', refundedMinor: 4550, amountMinor: 12000 });

		await refund(p.id, 'RF-1', 12000 - 4550);
		await fake.settled();
		expect(await payment(p.id)).toMatchObject({ status: 'refunded', refundedMinor: 12000 });
		expect((await refundRows(p.id)).map((r) => r.status)).toEqual(['succeeded', 'succeeded']);
		expect(await auditActions(p.id)).toEqual([
			'payment.paid',
			'payment.refund-requested',
			'payment.refunded',
			'payment.refund-requested',
			'payment.refunded'
		]);
	});

	it('refuses a refund beyond what is left, with the figures, and changes nothing', async () => {
		const p = await paid('RF-2', 5000);
		await refund(p.id, 'RF-2', 3000);
		await fake.settled();
		const before = fake.refunds.size;
		const over = refund(p.id, 'RF-2', 2001);
		await expect(over).rejects.toBeInstanceOf(RuleError);
		await expect(over).rejects.toThrow('At most €20.00 can be refunded: €50.00 paid, €30.00 refunded.');
		expect(fake.refunds.size).toBe(before);
		expect(await refundRows(p.id)).toHaveLength(1);
		expect((await payment(p.id)).refundedMinor).toBe(3000);
	});

	it('counts a refund still waiting for the service: two requests cannot together pass the amount', async () => {
		const p = await paid('RF-3', 5000);
		const results = await Promise.allSettled([refund(p.id, 'RF-3', 3000), refund(p.id, 'RF-3', 3000)]);
		expect(results.map((r) => r.status).sort()).toEqual(['fulfilled', 'rejected']);
		await fake.settled();
		expect((await payment(p.id)).refundedMinor).toBe(3000);
	});

	it('refuses a payment of another job, an unpaid one, and one refunded in full', async () => {
		const p = await paid('RF-4', 1000);
		await expect(refund(p.id, 'RF-other', 100)).rejects.toThrow('No such payment on this job.');
		await refund(p.id, 'RF-4', 1000);
		await fake.settled();
		await expect(refund(p.id, 'RF-4', 1)).rejects.toThrow('This payment has already been refunded in full.');
		const { paymentId } = await createCheckout({
			amountMinor: 1000,
			currency: 'EUR',
			description: 'Diagnostic fee',
			reference: { type: 'job', id: 'RF-5:q:fee' },
			successUrl: 'http://app.test/r/tok',
			cancelUrl: 'http://app.test/r/tok'
		});
		await expect(refund(paymentId, 'RF-5', 100)).rejects.toThrow('Only a paid payment can be refunded.');
	});

	it('refuses a refund event with a bad signature or none (400), and changes nothing', async () => {
		const p = await paid('RF-6', 2000);
		const payload = refundEvent(p, 500);
		expect(await postWebhook(payload, null)).toMatchObject({ status: 400, body: { received: false } });
		expect(await postWebhook(payload, sign(payload, 'whsec_not_ours'))).toMatchObject({
			status: 400,
			body: { message: 'Bad signature.' }
		});
		const tampered = payload.replace('"amount":500', '"amount":5');
		expect(tampered).not.toBe(payload);
		expect((await postWebhook(tampered, sign(payload))).status).toBe(400);
		expect(await payment(p.id)).toMatchObject({ status: 'paid', refundedMinor: 0 });
		expect(await refundRows(p.id)).toHaveLength(0);
	});

	it('applies a refund once: a replayed delivery, a duplicate event and a later update change nothing', async () => {
		const p = await paid('RF-7', 2000);
		const mine = await refund(p.id, 'RF-7', 800);
		await fake.settled();
		const created = fake.deliveries.findLast((d) => d.type === 'refund.created')!;
		const audit = (await auditActions(p.id)).length;

		// The same signed delivery again (the service retrying): recorded event id, no-op.
		expect((await fake.redeliver(created.eventId)).status).toBe(200);
		// The same refund in another event (refund.updated, succeeded): already applied.
		const event = fake.events.find((e) => e.id === created.eventId)!;
		const updated = JSON.stringify({ ...event, id: `${event.id}_upd`, type: 'refund.updated' });
		expect(await postWebhook(updated, sign(updated))).toMatchObject({
			status: 200,
			body: { outcome: 'ignored: refund already applied' }
		});
		// Replayed by someone holding the exact event, re-signed now: duplicate.
		const again = JSON.stringify(event);
		expect(await postWebhook(again, sign(again))).toMatchObject({
			status: 200,
			body: { duplicate: true }
		});
		expect(await payment(p.id)).toMatchObject({ refundedMinor: 800, status: 'paid' });
		expect(await refundRows(p.id)).toMatchObject([{ id: mine.id, status: 'succeeded' }]);
		expect((await auditActions(p.id)).length).toBe(audit);
	});

	it('records a refund made at the service itself, and refuses one beyond what was paid', async () => {
		const p = await paid('RF-8', 3000);
		const ok = refundEvent(p, 1000);
		expect(await postWebhook(ok, sign(ok))).toMatchObject({ body: { outcome: 'applied: refund' } });
		expect(await refundRows(p.id)).toMatchObject([
			{ amountMinor: 1000, requestedBy: null, status: 'succeeded' }
		]);

		const over = refundEvent(p, 2001);
		expect(await postWebhook(over, sign(over))).toMatchObject({
			status: 200,
			body: { outcome: 'refused: refund exceeds what was paid' }
		});
		expect(await payment(p.id)).toMatchObject({ refundedMinor: 1000, status: 'paid' });
		expect(await auditActions(p.id)).toContain('payment.refund-refused');
		// And in another currency: refused, nothing applied.
		const otherCurrency = refundEvent(p, 100, { currency: 'gbp' });
		expect(await postWebhook(otherCurrency, sign(otherCurrency))).toMatchObject({
			body: { outcome: 'refused: refund amount or currency differs' }
		});
		expect((await payment(p.id)).refundedMinor).toBe(1000);
	});

	it('gives the amount back when the service reports a confirmed refund failed, and tells the domain', async () => {
		vi.mocked(applyJobPayment).mockClear();
		const p = await paid('RF-9', 2000);
		const id = `re_test_${crypto.randomUUID().slice(0, 8)}`;
		const created = refundEvent(p, 700, { id });
		await postWebhook(created, sign(created));
		const failed = refundEvent(p, 700, {
			id,
			status: 'failed',
			failure_reason: 'expired_or_canceled_card'
		});
		expect(await postWebhook(failed, sign(failed))).toMatchObject({
			body: { outcome: 'applied: refund reversed' }
		});
		expect(await payment(p.id)).toMatchObject({ refundedMinor: 0, status: 'paid' });
		const refunds = vi
			.mocked(applyJobPayment)
			.mock.calls.flatMap(([, , , change]) => (change ? [change] : []));
		expect(refunds.map((c) => c.amountMinor)).toEqual([700, -700]);
	});
});

describe('the job page’s refund action', () => {
	type Refused = {
		status: number;
		data: { form: { data: Record<string, string>; errors: Record<string, string[] | undefined> } };
	};
	/** The refusal's sentence: beside the amount, or under the form. */
	const said = (r: Refused) => r.data.form.errors.amount?.[0] ?? r.data.form.errors._errors?.[0];
	const event = (role: 'lead' | 'technician', jobId: string, form: Record<string, string>) =>
		({
			locals: { user: { id: role === 'lead' ? leadId : techId, role } },
			params: { id: jobId },
			request: new Request('http://app.test/jobs/x?/refund', {
				method: 'POST',
				body: new URLSearchParams(form)
			}),
			url: new URL(`http://app.test/jobs/${jobId}`),
			route: { id: '/(app)/jobs/[id]' }
		}) as never;

	it('is for leads only: a technician gets 403 and nothing is refunded', async () => {
		const p = await paid('00000000-0000-4000-8000-00000000000a', 1000);
		await expect(
			actions.refund(
				event('technician', '00000000-0000-4000-8000-00000000000a', { paymentId: p.id, amount: '1' })
			)
		).rejects.toMatchObject({ status: 403 });
		expect(await refundRows(p.id)).toHaveLength(0);
	});

	it('says so when payments are not set up, and records nothing', async () => {
		const jobId = '00000000-0000-4000-8000-00000000000c';
		const p = await paid(jobId, 1000);
		setFakePayments(null);
		try {
			const r = (await actions.refund(event('lead', jobId, { paymentId: p.id, amount: '5' }))) as Refused;
			expect(r.status).toBe(503);
			expect(said(r)).toMatch(/^Payments are not set up/);
		} finally {
			const { secretKey, webhookSecret, host, port } = fake;
			setFakePayments({ secretKey, webhookSecret, endpoint: { host, port, protocol: 'http' } });
		}
		expect(await refundRows(p.id)).toHaveLength(0);
	});

	it('turns the typed amount into minor units and says why it refuses, keeping what was typed', async () => {
		const jobId = '00000000-0000-4000-8000-00000000000b';
		const p = await paid(jobId, 2500);
		const run = (amount: string) =>
			actions.refund(event('lead', jobId, { paymentId: p.id, amount, reason: 'Part not used' }));
		for (const [amount, message] of [
			['', 'Enter the amount to refund.'],
			['-3', 'A refund cannot be negative.'],
			['0', 'The refund must be more than zero.'],
			['1.234', 'At most 2 decimals.'],
			['25.01', 'At most €25.00 can be refunded: €25.00 paid, €0.00 refunded.']
		]) {
			const r = (await run(amount)) as Refused;
			expect(r.data.form).toMatchObject({ id: `refund-${p.id}`, data: { amount, reason: 'Part not used' } });
			expect(said(r)).toBe(message);
		}
		expect(await run('10.5')).toMatchObject({ form: { valid: true, message: 'Refunded €10.50.' } });
		expect(await payment(p.id)).toMatchObject({ refundedMinor: 1050, status: 'paid' });
		const db = await getDb();
		const [row] = await db
			.select()
			.from(auditLog)
			.where(and(eq(auditLog.targetId, p.id), eq(auditLog.action, 'payment.refund-requested')));
		expect(row).toMatchObject({ actorId: leadId });
	});
});
