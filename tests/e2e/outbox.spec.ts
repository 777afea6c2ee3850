import fs from 'node:fs';
import path from 'node:path';
import { expect, test } from '@playwright/test';
import { signIn } from './helpers';

// The server runs with TIDEMARK_FAKES=1 (playwright.config.ts): mail goes to the app's local SMTP
// server, which stores each message as JSON in $DATA_DIR/fake_mailbox.
type StoredMail = { envelopeTo: string[]; subject: string; text: string; html: string | null };

function mailbox(): StoredMail[] {
	const dir = path.join(process.env.E2E_DATA_DIR ?? '.e2e-data', 'fake_mailbox');
	if (!fs.existsSync(dir)) return [];
	return fs
		.readdirSync(dir)
		.filter((f) => f.endsWith('.json'))
		.map((f) => JSON.parse(fs.readFileSync(path.join(dir, f), 'utf8')) as StoredMail);
}

test('a lead sends a test message: it leaves through the queue and arrives at the SMTP server', async ({
	page
}) => {
	const to = `outbox-${Date.now()}@example.test`;
	await signIn(page, 'lead', '/outbox');
	await expect(page.getByTestId('mail-transport')).toContainText('local test mail server');
	await page.getByLabel('Send to').fill(to);
	await page.getByRole('button', { name: 'Queue test message' }).click();
	await expect(page.getByText(`A test message to ${to} is queued.`)).toBeVisible();

	const row = page.getByTestId('outbox-row').filter({ hasText: to });
	await expect(row.getByText('Sent', { exact: true })).toBeVisible({ timeout: 15_000 });
	// The app's one date format (formatDateTime in src/lib/jobs/format.ts: en-GB, "4 Dec 2026, 14:35").
	const appDate = /^\d{1,2} [A-Z][a-z]{2,3} \d{4}, \d{2}:\d{2}$/;
	await expect(row.getByTestId('outbox-when')).toHaveText(appDate);
	await expect.poll(() => mailbox().filter((m) => m.envelopeTo.includes(to)).length).toBe(1);
	const [mail] = mailbox().filter((m) => m.envelopeTo.includes(to));
	expect(mail.text).toContain('from the Tidemark Outbox');
	expect(mail.html).toContain('If you can read it');

	await row.getByRole('link').click();
	await expect(page.getByTestId('mail-status')).toHaveText('Sent');
	await expect(page.getByTestId('mail-sent-at')).toHaveText(appDate);
	await expect(page.locator('iframe[title="HTML version of the message"]')).toBeVisible();
	await page.getByRole('button', { name: 'Plain text' }).click();
	await expect(page.getByTestId('mail-text')).toContainText('from the Tidemark Outbox');
});

test('a refused address fails with the server’s reason, and can be retried', async ({ page }) => {
	const to = `nobody-${Date.now()}@nowhere.invalid`;
	await signIn(page, 'lead', '/outbox');
	await page.getByLabel('Send to').fill(to);
	await page.getByRole('button', { name: 'Queue test message' }).click();
	const row = page.getByTestId('outbox-row').filter({ hasText: to });
	await expect(row.getByText('Failed', { exact: true })).toBeVisible({ timeout: 15_000 });
	await expect(row).toContainText('550');
	await row.getByRole('button', { name: 'Retry now' }).click();
	await expect(page.getByText('Queued again')).toBeVisible();
	expect(mailbox().some((m) => m.envelopeTo.includes(to))).toBe(false);
});

test('the Outbox is for leads only', async ({ page }) => {
	await signIn(page, 'senior');
	const response = await page.goto('/outbox');
	expect(response?.status()).toBe(403);
	await expect(
		page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Outbox' })
	).toHaveCount(0);
});

test('the payment webhook refuses an unsigned or badly signed call', async ({ request }) => {
	const body = {
		id: 'evt_test_e2e',
		object: 'event',
		type: 'checkout.session.completed',
		data: { object: {} }
	};
	const unsigned = await request.post('/api/payments/webhook', { data: body });
	expect(unsigned.status()).toBe(400);
	const forged = await request.post('/api/payments/webhook', {
		data: body,
		headers: { 'stripe-signature': `t=${Math.floor(Date.now() / 1000)},v1=${'0'.repeat(64)}` }
	});
	expect(forged.status()).toBe(400);
	expect(await forged.json()).toMatchObject({ received: false, message: 'Bad signature.' });
});
