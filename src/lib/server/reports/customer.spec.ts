// Over 300 lines on purpose: a spec: the customer link, report and payment end to end.
import crypto from 'node:crypto';
import { RuleError } from '$lib/server/errors';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import Stripe from 'stripe';
import { getDb } from '$lib/server/db';
import { outgoingMail } from '$lib/server/db/schema/mail';
import { payments } from '$lib/server/db/schema/payments';
import { quotes, reportLinks } from '$lib/server/db/schema/quotes';
import { startFakes, stopFakes } from '$lib/server/fakes';
import { processWebhook } from '$lib/server/payments/webhook';
import { paymentsConfig } from '$lib/server/payments/config';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import { setMoney } from '$lib/server/settings/queries';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as quotesQ from '$lib/server/quotes/queries';
import * as links from './links';
import * as report from './report';
import { sendReport, startPayment } from './customer';

// Real in-memory PGlite; the payment SDK talks to the local fake (as payments.spec.ts does). A
// webhook is built here and signed with the fake's secret by the SDK's own test helper.

let techId: string;
let seq = 0;
const imei = () => {
	const body = `0022${String(++seq).padStart(10, '0')}`;
	return `${body}${imeiCheckDigit(body)}`;
};

async function newJob(email: string | null = 'mara@example.test') {
	return jobs.create(
		techId,
		makeJobIntake().parse({
			customerName: 'Mara Quillon',
			customerEmail: email ?? '',
			customerPhone: email ? undefined : '+44 20 7946 0000',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: imei(),
			symptoms: ['no-power'],
			liquid: 'salt',
			submerged: false,
			passcodeStatus: 'withheld',
			notes: 'INTERNAL: customer was rude at the counter'
		})
	);
}

const lines = [
	{ description: 'Diagnosis', kind: 'fee' as const, quantity: 1, unitMinor: 4900 },
	{ description: 'Board clean and repair', kind: 'labour' as const, quantity: 1, unitMinor: 12000 }
];

async function mailsFor(jobId: string) {
	const db = await getDb();
	return db.select().from(outgoingMail).where(eq(outgoingMail.relatedId, jobId));
}

beforeAll(async () => {
	techId = (
		await staff.create(null, {
			name: 'Pia Lundqvist',
			email: `pia-${crypto.randomUUID()}@shop.test`,
			role: 'technician',
			password: 'tech-password-1'
		})
	).id;
	// 20 % included: a round rate whose totals are easy to check by hand.
	await setMoney({ currency: 'EUR', taxRateBasisPoints: 2000, pricesIncludeTax: true });
	process.env.TIDEMARK_FAKES = '1';
	process.env.PUBLIC_BASE_URL = 'http://app.test';
	delete process.env.STRIPE_SECRET_KEY;
	delete process.env.SMTP_URL;
	await startFakes();
});

afterAll(async () => {
	await stopFakes();
});

describe('report links', () => {
	it('stores only the SHA-256 of a 256-bit token, and the token opens its job', async () => {
		const job = await newJob();
		await quotesQ.save(techId, job.id, { lines });
		const { url, link } = await sendReport(techId, job.id);
		const token = url.split('/r/')[1];
		expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/); // 32 bytes in base64url (RFC 4648 §5): 43 characters
		const db = await getDb();
		const [row] = await db.select().from(reportLinks).where(eq(reportLinks.id, link.id));
		// sha256 checked against node's own implementation, and the token appears in no column.
		expect(row.tokenHash).toBe(crypto.createHash('sha256').update(token).digest('hex'));
		expect(JSON.stringify(row)).not.toContain(token);
		expect((await links.resolve(token))?.jobId).toBe(job.id);
		// Two links are never the same token.
		expect(links.newToken()).not.toBe(links.newToken());
	});

	it('expires: the link works until its lifetime ends, then resolves to nothing', async () => {
		const job = await newJob();
		const db = await getDb();
		const created = new Date('2026-01-01T00:00:00Z');
		const { token } = await db.transaction((tx) => links.create(tx, job.id, techId, 14, created));
		expect(await links.resolve(token, new Date('2026-01-14T23:59:59Z'))).not.toBeNull();
		expect(await links.resolve(token, new Date('2026-01-15T00:00:00Z'))).toBeNull();
	});

	it('is scoped: the token of job A builds only job A’s report, and revocation closes it', async () => {
		const a = await newJob();
		const b = await newJob();
		await quotesQ.save(techId, b.id, { lines });
		const { url, link } = await sendReport(techId, a.id);
		const token = url.split('/r/')[1];
		const resolved = await links.resolve(token);
		expect(resolved?.jobId).toBe(a.id);
		const r = await report.build(resolved!.jobId, 'customer', `/r/${token}/photos`);
		expect(r?.job.id).toBe(a.id);
		expect(r?.quote).toBeNull(); // job A has no quote; job B's is not visible through A's link
		expect(await links.revoke(a.id, link.id, techId)).toBe(true);
		expect(await links.revoke(a.id, link.id, techId)).toBe(false); // twice changes nothing
		expect(await links.resolve(token)).toBeNull();
		// A made-up or malformed token is refused the same way.
		expect(await links.resolve(links.newToken())).toBeNull();
		expect(await links.resolve('../../etc')).toBeNull();
	});

	it('the customer cut hides internal notes, staff and all but the last 4 IMEI digits', async () => {
		const job = await newJob();
		await quotesQ.save(techId, job.id, { lines, proposal: 'Clean the board.' });
		await sendReport(techId, job.id);
		const r = await report.build(job.id, 'customer', '/r/x/photos');
		const text = JSON.stringify(r);
		expect(r?.job.identifier).toBe(`•••• ${job.imei!.slice(-4)}`);
		expect(text).not.toContain(job.imei!);
		expect(text).not.toContain('INTERNAL');
		expect(text).not.toContain('Pia Lundqvist');
		expect(text).not.toContain('@shop.test');
	});

	it('before findings or a quote, the mail says "received and being examined" with the link, and the job stays in diagnosis', async () => {
		const job = await newJob();
		await jobs.transition(job.id, 'diagnosing', techId);
		const { url } = await sendReport(techId, job.id);
		const [mail] = await mailsFor(job.id);
		expect(mail.subject).toMatch(/received and being examined/);
		expect(mail.text).toContain(url);
		expect(mail.text).toContain('and are examining it');
		expect(mail.text).not.toMatch(/our findings|the photos|price are|approve the quote/i);
		// Nothing to approve yet, so the job is not "awaiting approval".
		expect((await jobs.get(job.id))!.status).toBe('diagnosing');
	});

	it('with a quote but no findings, the mail names the quote and the job moves to awaiting approval', async () => {
		const job = await newJob();
		await quotesQ.save(techId, job.id, { lines });
		await jobs.transition(job.id, 'diagnosing', techId);
		await sendReport(techId, job.id);
		const [mail] = await mailsFor(job.id);
		expect(mail.subject).toMatch(/— quote \(job/);
		expect(mail.text).toContain('The repair we propose with its price is on this private page');
		expect(mail.text).not.toMatch(/our findings|the photos/i);
		expect((await jobs.get(job.id))!.status).toBe('awaiting-approval');
	});

	it('refuses to send without a customer e-mail', async () => {
		const job = await newJob(null);
		await expect(sendReport(techId, job.id)).rejects.toThrow(/no e-mail address/);
	});
});

describe('quotes', () => {
	it('saves totals from quoteTotals; editing after sending makes a new version', async () => {
		const job = await newJob();
		const v1 = await quotesQ.save(techId, job.id, { lines });
		// 169.00 gross incl. 20 %: tax = round(16900 · 2000 / 12000) = 2816.67 → 2817 (hand-computed).
		expect(v1).toMatchObject({
			version: 1,
			status: 'draft',
			grossMinor: 16900,
			taxMinor: 2817,
			netMinor: 14083
		});
		const again = await quotesQ.save(techId, job.id, { lines: lines.slice(0, 1) });
		expect(again).toMatchObject({ id: v1.id, version: 1, grossMinor: 4900 }); // a draft changes in place
		await sendReport(techId, job.id);
		const v2 = await quotesQ.save(techId, job.id, { lines });
		expect(v2).toMatchObject({ version: 2, status: 'draft' });
		const versions = await quotesQ.listForJob(job.id);
		expect(versions.map((q) => [q.version, q.status])).toEqual([
			[2, 'draft'],
			[1, 'superseded']
		]);
		expect(quotesQ.customerVisible(versions)).toBeNull(); // revising: no price shown meanwhile
	});

	it('refuses negative and absurd amounts', async () => {
		const job = await newJob();
		await expect(
			quotesQ.save(techId, job.id, { lines: [{ ...lines[0], unitMinor: -100 }] })
		).rejects.toThrow();
		await expect(
			quotesQ.save(techId, job.id, { lines: [{ ...lines[0], quantity: 1000, unitMinor: 10_000_000 }] })
		).rejects.toThrow(/refused/);
		expect(await quotesQ.listForJob(job.id)).toEqual([]);
	});

	it('a second approval changes nothing; declining an approved quote is refused', async () => {
		const job = await newJob();
		const q = await quotesQ.save(techId, job.id, { lines });
		await sendReport(techId, job.id);
		const first = await quotesQ.decide(job.id, q.id, 'approved', 'Mara Quillon');
		expect(first.changed).toBe(true);
		expect(first.quote.approvedName).toBe('Mara Quillon');
		const second = await quotesQ.decide(job.id, q.id, 'approved', 'Someone Else');
		expect(second.changed).toBe(false);
		expect(second.quote.approvedName).toBe('Mara Quillon');
		expect(second.quote.approvedAt).toEqual(first.quote.approvedAt);
		await expect(quotesQ.decide(job.id, q.id, 'declined', 'Mara Quillon')).rejects.toThrow(
			/already approved/
		);
		await expect(quotesQ.decide(job.id, q.id, 'approved', ' ')).rejects.toThrow(/full name/);
	});
});

describe('payment', () => {
	async function confirm(sessionId: string) {
		const db = await getDb();
		const [p] = await db.select().from(payments).where(eq(payments.providerSessionId, sessionId));
		const payload = JSON.stringify({
			id: `evt_${crypto.randomUUID()}`,
			object: 'event',
			type: 'checkout.session.completed',
			created: Math.floor(Date.now() / 1000),
			data: {
				object: {
					id: sessionId,
					object: 'checkout.session',
					payment_status: 'paid',
					amount_total: p.amountMinor,
					currency: p.currency,
					client_reference_id: p.id,
					metadata: { payment_id: p.id }
				}
			}
		});
		const header = new Stripe('sk_test_unused').webhooks.generateTestHeaderString({
			payload,
			secret: paymentsConfig()!.webhookSecret!
		});
		return processWebhook(payload, header);
	}

	it('webhook → the quote is paid and the receipt is queued; paying again is refused', async () => {
		const job = await newJob();
		const q = await quotesQ.save(techId, job.id, { lines });
		await sendReport(techId, job.id);
		await quotesQ.decide(job.id, q.id, 'approved', 'Mara Quillon');
		expect(quotesQ.paymentOptions(q, 0)).toEqual([]); // the draft row itself offers nothing
		const checkout = await startPayment(job.id, q.id, 'rest', '/r/tok');
		const result = await confirm(checkout.sessionId);
		expect(result.body.outcome).toBe('applied: paid');

		const db = await getDb();
		const [paid] = await db.select().from(quotes).where(eq(quotes.id, q.id));
		expect(paid.paidMinor).toBe(16900);
		expect(paid.paidAt).not.toBeNull();
		expect(await quotesQ.paidForJob(job.id)).toBe(16900);
		const receipts = (await mailsFor(job.id)).filter((m) => m.template === 'payment-receipt');
		expect(receipts).toHaveLength(1);
		expect(receipts[0].subject).toContain('€169.00');
		expect(receipts[0].to).toBe('mara@example.test');

		await expect(startPayment(job.id, q.id, 'rest', '/r/tok')).rejects.toThrow(/already paid in full/);
		await expect(startPayment(job.id, q.id, 'fee', '/r/tok')).rejects.toThrow(RuleError);
	});

	it('a confirmed refund takes its amount off what the job kept, but is not owed again', async () => {
		const job = await newJob();
		const q = await quotesQ.save(techId, job.id, { lines });
		await sendReport(techId, job.id);
		await quotesQ.decide(job.id, q.id, 'approved', 'Mara Quillon');
		const checkout = await startPayment(job.id, q.id, 'rest', '/r/tok');
		await confirm(checkout.sessionId);
		const db = await getDb();
		const [p] = await db.select().from(payments).where(eq(payments.providerSessionId, checkout.sessionId));
		const payload = JSON.stringify({
			id: `evt_${crypto.randomUUID()}`,
			object: 'event',
			type: 'refund.created',
			created: Math.floor(Date.now() / 1000),
			data: {
				object: {
					id: `re_${crypto.randomUUID().slice(0, 8)}`,
					object: 'refund',
					amount: 4000,
					currency: 'eur',
					status: 'succeeded',
					metadata: { payment_id: p.id }
				}
			}
		});
		const header = new Stripe('sk_test_unused').webhooks.generateTestHeaderString({
			payload,
			secret: paymentsConfig()!.webhookSecret!
		});
		expect((await processWebhook(payload, header)).body.outcome).toBe('applied: refund');

		// 169.00 paid − 40.00 refunded = 129.00 kept; nothing is due again.
		const [after] = await db.select().from(quotes).where(eq(quotes.id, q.id));
		expect(after.paidMinor).toBe(12900);
		expect(await quotesQ.paidForJob(job.id)).toBe(12900);
		expect(await quotesQ.receivedForJob(job.id)).toBe(16900);
		expect(quotesQ.paymentOptions(after, await quotesQ.receivedForJob(job.id))).toEqual([]);
		await expect(startPayment(job.id, q.id, 'rest', '/r/tok')).rejects.toThrow(/already paid in full/);
		const r = await report.build(job.id, 'customer');
		expect(r).toMatchObject({ paidMinor: 12900, refundedMinor: 4000 });
		// No receipt for a refund: still the one receipt of the payment, and one refund notice.
		const mails = await mailsFor(job.id);
		expect(mails.filter((m) => m.template === 'payment-receipt')).toHaveLength(1);
		const notices = mails.filter((m) => m.template === 'refund-notice');
		expect(notices).toHaveLength(1);
		expect(notices[0].subject).toContain('€40.00');
		// A replayed delivery of the same event queues nothing more.
		expect((await processWebhook(payload, header)).body.outcome).not.toBe('applied: refund');
		expect((await mailsFor(job.id)).filter((m) => m.template === 'refund-notice')).toHaveLength(1);
	});

	it('the diagnostic fee can be paid before approval; then only the rest is due', async () => {
		const job = await newJob();
		const q = await quotesQ.save(techId, job.id, { lines });
		await sendReport(techId, job.id);
		const shown = quotesQ.customerVisible(await quotesQ.listForJob(job.id))!;
		expect(quotesQ.paymentOptions(shown, 0)).toEqual([
			{ kind: 'fee', amountMinor: 4900, label: 'Pay the diagnostic fee' }
		]);
		await expect(startPayment(job.id, q.id, 'rest', '/r/tok')).rejects.toThrow(/nothing of that kind/);
		const fee = await startPayment(job.id, q.id, 'fee', '/r/tok');
		await confirm(fee.sessionId);
		// The same fee again: refused by the checkout (already paid) before any session is opened.
		await expect(
			startPayment(job.id, q.id, 'fee', '/r/tok').catch((e) => {
				throw e instanceof RuleError ? new Error('refused') : e;
			})
		).rejects.toThrow('refused');
		const { quote } = await quotesQ.decide(job.id, q.id, 'approved', 'Mara Quillon');
		expect(quotesQ.paymentOptions(quote, await quotesQ.paidForJob(job.id))).toEqual([
			{ kind: 'rest', amountMinor: 12000, label: 'Pay the rest' }
		]);
	});
});

describe('ready to collect', () => {
	it('moving a job to ready queues the mail with what is left to pay', async () => {
		const job = await newJob();
		const q = await quotesQ.save(techId, job.id, { lines });
		await jobs.transition(job.id, 'diagnosing', techId);
		await sendReport(techId, job.id); // moves diagnosing → awaiting approval
		await quotesQ.decide(job.id, q.id, 'approved', 'Mara Quillon');
		await jobs.transition(job.id, 'repairing', techId);
		await jobs.transition(job.id, 'testing', techId);
		// No run, so no after-repair test: the ready gate takes a reason instead (checklists/gate.ts).
		await jobs.transition(
			job.id,
			'ready',
			techId,
			'Screen module swapped at the counter; tested with the customer'
		);
		const db = await getDb();
		const ready = await db
			.select()
			.from(outgoingMail)
			.where(and(eq(outgoingMail.relatedId, job.id), eq(outgoingMail.template, 'ready-to-collect')));
		expect(ready).toHaveLength(1);
		expect(ready[0].text).toContain('Left to pay at the counter: €169.00.');
	});
});
