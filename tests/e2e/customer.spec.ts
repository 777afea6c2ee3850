import fs from 'node:fs';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { imeiCheckDigit } from '../../src/lib/domain/identifiers';
import { hydrated, signIn } from './helpers';

// The server runs with TIDEMARK_FAKES=1 (playwright.config.ts): mail goes to the app's local SMTP
// server (stored as JSON in $DATA_DIR/fake_mailbox), payments to its local checkout fake.
type StoredMail = { envelopeTo: string[]; subject: string; text: string; html: string | null };
function mailbox(): StoredMail[] {
	const dir = path.join(process.env.E2E_DATA_DIR ?? '.e2e-data', 'fake_mailbox');
	if (!fs.existsSync(dir)) return [];
	return fs
		.readdirSync(dir)
		.filter((f) => f.endsWith('.json'))
		.map((f) => JSON.parse(fs.readFileSync(path.join(dir, f), 'utf8')) as StoredMail);
}
const mailTo = (to: string) => mailbox().filter((m) => m.envelopeTo.includes(to));

let serial = 0;
const imei = () => {
	const body = `0044${String(Date.now() % 1e8).padStart(8, '0')}${String(++serial).padStart(2, '0')}`;
	return `${body}${imeiCheckDigit(body)}`;
};

/**
 * A job and a completed run through the API: the restart-loop flow's measure path
 * (flows/restart-loop-after-liquid.flow.yaml, as in run.spec.ts: answers 1, 2, 1, 1, then 0.02 V)
 * ends at "A front sensor line is shorted to ground on the board".
 */
async function diagnosedJob(page: Page, email: string) {
	const res = await page.request.post('/api/jobs', {
		data: {
			customerName: 'Edda Brightwater',
			customerEmail: email,
			maker: 'Corvana',
			model: 'Tern 6 Pro',
			imei: imei(),
			symptoms: ['restart-loop'],
			liquid: 'salt',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true,
			dataFirst: false,
			notes: 'Staff-only: second visit this month'
		}
	});
	expect(res.status(), await res.text()).toBe(201);
	const job = (await res.json()) as { id: string; jobNumber: string };
	const started = await page.request.post('/api/runs', {
		data: { jobId: job.id, flowId: 'restart-loop-after-liquid' }
	});
	expect(started.status(), await started.text()).toBe(201);
	const run = (await started.json()) as { id: string; currentStep: string };
	let step = run.currentStep;
	const events = [
		...[0, 1, 0, 0].map((outcome) => ({ type: 'ANSWER', outcome })),
		{ type: 'MEASURE', value: 0.02 }
	];
	for (const [i, e] of events.entries()) {
		const r = await page.request.post(`/api/runs/${run.id}/events`, {
			data: { ...e, stepId: step, idempotencyKey: `customer-e2e-${run.id}-${i}` }
		});
		expect(r.status(), await r.text()).toBe(200);
		const body = (await r.json()) as { state: { currentStep: string; status: string } };
		step = body.state.currentStep;
		if (i === events.length - 1) expect(body.state.status).toBe('completed');
	}
	return job;
}

test('report → mail → customer approves and pays → job paid and approved → both mails in the Outbox', async ({
	page,
	browser
}) => {
	const email = `edda-${Date.now()}@example.test`;
	await signIn(page, 'tech');
	const job = await diagnosedJob(page, email);

	// The technician writes the quote: a bad amount is refused beside its field.
	await page.goto(`/jobs/${job.id}`);
	await hydrated(page);
	const quote = page.locator('[data-section="quote"]');
	await quote.getByLabel('Each (EUR)').first().fill('-5');
	await quote.getByRole('button', { name: 'Save quote' }).click();
	await expect(quote.getByText('A price cannot be negative.')).toBeVisible();
	await quote.getByLabel('Each (EUR)').first().fill('49');
	await quote.getByRole('button', { name: 'Add a line' }).click();
	await quote.getByLabel('Item').nth(1).fill('Replace the front sensor flex');
	await quote.getByLabel('Each (EUR)').nth(1).fill('80.00');
	await expect(quote.getByTestId('quote-preview')).toContainText('€129.00');
	await quote.getByRole('button', { name: 'Save quote' }).click();
	await expect(quote.getByText('Quote version 1 saved.')).toBeVisible();

	// Send report → the mail reaches the local SMTP server.
	const side = page.locator('[data-section="customer"]');
	await side.getByRole('button', { name: 'Send report' }).click();
	await expect(side.getByText('Report sent')).toBeVisible();
	await expect.poll(() => mailTo(email).length, { timeout: 20_000 }).toBe(1);
	const [reportMail] = mailTo(email);
	const link = /https?:\/\/\S+\/r\/[A-Za-z0-9_-]{43}/.exec(reportMail.text)?.[0];
	expect(link, reportMail.text).toBeTruthy();

	// The customer, in a fresh browser without a session, on a phone-sized screen.
	const customer = await (await browser.newContext({ viewport: { width: 390, height: 844 } })).newPage();
	await customer.goto(new URL(link!).pathname);
	await hydrated(customer);
	await expect(customer.getByRole('heading', { name: 'Findings report' })).toBeVisible();
	await expect(customer.getByText('The main board needs a repair at component level.')).toBeVisible();
	await expect(customer.getByTestId('quote-total')).toHaveText('€129.00');
	const body = await customer.locator('body').innerText();
	expect(body).not.toContain('Nadia Fenwick'); // the demo technician
	expect(body).not.toContain('tech@tidemark.test');
	expect(body).not.toContain('Staff-only');
	await expect(customer.getByTestId('report-identifier')).toHaveText(/^•••• \d{4}$/);
	await expect(customer.getByRole('link', { name: 'Jobs' })).toHaveCount(0);

	await customer.getByLabel('To approve or decline, type your full name').fill('Edda Brightwater');
	await customer.getByRole('button', { name: 'Approve the quote' }).click();
	await expect(customer.getByText('Thank you: the quote is approved.')).toBeVisible();
	await expect(customer.getByTestId('quote-decision')).toContainText('Approved by Edda Brightwater');

	// Pay the whole quote on the fake checkout (another origin: the page navigates there).
	await customer.getByRole('button', { name: /Pay the whole quote: €129\.00/ }).click();
	await customer.waitForURL(/\/pay\//);
	await customer.locator('button[value="succeed"]').click();
	await customer.waitForURL(/\/r\/[A-Za-z0-9_-]{43}\?paid=1/);
	await expect(customer.getByText('Thank you. Your payment is confirmed')).toBeVisible();
	await expect(customer.getByRole('button', { name: /Pay/ })).toHaveCount(0);

	// The job shows paid and approved.
	await page.reload();
	await expect(quote.getByTestId('quote-status')).toHaveText('Approved');
	await expect(quote.getByTestId('quote-paid')).toHaveText('€129.00');
	await expect(side.getByTestId('payment-row').first()).toContainText('Paid');

	// The lead sees both mails in the Outbox.
	await expect.poll(() => mailTo(email).length, { timeout: 20_000 }).toBe(2);
	const lead = await (await browser.newContext()).newPage();
	await signIn(lead, 'lead', '/outbox');
	const rows = lead.getByTestId('outbox-row').filter({ hasText: email });
	await expect(rows).toHaveCount(2);
	await expect(rows.filter({ hasText: 'findings and quote' })).toHaveCount(1);
	await expect(rows.filter({ hasText: 'Receipt' })).toHaveCount(1);

	// Refunds are for the lead: the technician has no refund button; the lead refunds part of the
	// payment (a refund beyond what was paid is refused with the figures) and the job shows it.
	await expect(side.getByRole('button', { name: 'Refund…' })).toHaveCount(0);
	await lead.goto(`/jobs/${job.id}`);
	await hydrated(lead); // "Refund…" opens its form only once the page runs
	const leadSide = lead.locator('[data-section="customer"]');
	await leadSide.getByRole('button', { name: 'Refund…' }).click();
	const amount = leadSide.getByLabel('Amount to refund (EUR)');
	await expect(amount).toHaveValue('129.00');
	await amount.fill('129.01');
	await leadSide.getByRole('button', { name: 'Refund', exact: true }).click();
	await expect(leadSide.getByRole('alert')).toHaveText(
		'At most €129.00 can be refunded: €129.00 paid, €0.00 refunded.'
	);
	await expect(amount).toHaveValue('129.01');
	await amount.fill('29');
	await leadSide.getByLabel(/Reason/).fill('Back cover not replaced');
	await leadSide.getByRole('button', { name: 'Refund', exact: true }).click();
	await expect(leadSide.getByTestId('refund-feedback')).toHaveText('Refunded €29.00.');
	await expect(leadSide.getByTestId('refund-row')).toHaveAttribute('data-status', 'succeeded');
	await expect(leadSide.getByTestId('refund-row')).toContainText('Back cover not replaced');
	await expect(leadSide.getByTestId('total-paid')).toHaveText('€129.00');
	await expect(leadSide.getByTestId('total-refunded')).toHaveText('€29.00');
	await expect(leadSide.getByTestId('total-kept')).toHaveText('€100.00');
	await expect(leadSide.getByTestId('payment-status')).toHaveText('Paid, €29.00 refunded');
	await expect(lead.locator('[data-section="quote"]').getByTestId('quote-paid')).toHaveText('€100.00');
	await page.reload();
	await expect(quote.getByTestId('quote-paid')).toHaveText('€100.00');
	// The customer's page shows the refund, and the refunded amount is not asked for again.
	await customer.reload();
	await expect(customer.getByTestId('quote-refunded')).toHaveText('€29.00');
	await expect(customer.getByTestId('quote-due')).toHaveText('€0.00');
	await expect(customer.getByRole('button', { name: /Pay/ })).toHaveCount(0);
	// …and the customer is told by mail.
	await expect.poll(() => mailTo(email).length, { timeout: 20_000 }).toBe(3);
	expect(mailTo(email).some((m) => /Refund: €29\.00/.test(m.subject))).toBe(true);

	// Revoking the link closes it with the same plain page as a made-up one.
	await side.getByRole('button', { name: 'Revoke' }).click();
	await expect(side.getByText('Link revoked')).toBeVisible();
	const revoked = await customer.goto(new URL(link!).pathname);
	expect(revoked?.status()).toBe(404);
	await expect(customer.getByRole('heading', { name: 'This link is no longer valid' })).toBeVisible();
});

test('an unknown or malformed token gets the same plain page, with nothing about staff', async ({ page }) => {
	for (const token of ['A'.repeat(43), 'short']) {
		const res = await page.goto(`/r/${token}`);
		expect(res?.status()).toBe(404);
		await expect(page.getByRole('heading', { name: 'This link is no longer valid' })).toBeVisible();
		const text = await page.locator('body').innerText();
		expect(text).not.toMatch(/sign in|Tidemark|Jobs/i);
	}
	const photo = await page.request.get(
		`/r/${'B'.repeat(43)}/photos/00000000-0000-4000-8000-000000000000/thumb`
	);
	expect(photo.status()).toBe(404);
});

test('the label carries the job number and a QR code; settings are for leads', async ({ page }) => {
	await signIn(page, 'tech');
	const job = await diagnosedJob(page, `label-${Date.now()}@example.test`);
	await page.goto(`/jobs/${job.id}/label`);
	await expect(page.getByTestId('job-label')).toContainText(job.jobNumber);
	await expect(page.getByRole('img', { name: /QR code/ })).toHaveAttribute(
		'src',
		/^data:image\/svg\+xml;base64,/
	);
	const res = await page.goto('/settings');
	expect(res?.status()).toBe(403);
});
