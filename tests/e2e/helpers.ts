import { expect, type Page } from '@playwright/test';
import { imeiCheckDigit } from '../../src/lib/domain/identifiers';

// The demo accounts seeded by the test server (TIDEMARK_DEMO=1, DEMO_PASSWORD in playwright.config.ts).
export const password = 'e2e-demo-password';
export const accounts = {
	lead: 'lead@tidemark.test',
	senior: 'senior@tidemark.test',
	tech: 'tech@tidemark.test'
} as const;

export async function signIn(page: Page, who: keyof typeof accounts, next = '/') {
	await page.goto(`/signin?next=${encodeURIComponent(next)}`);
	await page.getByLabel('E-mail').fill(accounts[who]);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/\/signin/);
	await hydrated(page);
}

/** Waits until the page is hydrated (the root layout marks <html data-hydrated>). */
export async function hydrated(page: Page) {
	await expect(page.locator('html[data-hydrated="true"]')).toHaveCount(1);
}

let serial = 0;
/**
 * An invented test IMEI: `prefix` (4 digits, "00…" is no real reporting body) then 8 digits of the
 * clock and 2 of a counter, so every call in a run differs; the check digit is computed.
 */
export function testImei(prefix = '0050') {
	const body = `${prefix}${String(Date.now() % 1e8).padStart(8, '0')}${String(++serial % 100).padStart(2, '0')}`;
	return `${body}${imeiCheckDigit(body)}`;
}

/**
 * Books in a job through the API as the signed-in user: an invented customer and device, fresh
 * water, consent to open; `fields` (at least the symptoms) override any of them. Returns its id.
 */
export async function createJob(page: Page, fields: { symptoms: string[] } & Record<string, unknown>) {
	const res = await page.request.post('/api/jobs', {
		data: {
			customerName: 'Ines Larkspur',
			customerEmail: 'ines@example.test',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: testImei(),
			liquid: 'fresh',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true,
			...fields
		}
	});
	expect(res.status(), await res.text()).toBe(201);
	return ((await res.json()) as { id: string }).id;
}

/** Starts a run of the flow's current published version for the job, through the API; returns its id. */
export async function startRun(page: Page, jobId: string, flowId: string) {
	const res = await page.request.post('/api/runs', { data: { jobId, flowId } });
	expect(res.status(), await res.text()).toBe(201);
	return ((await res.json()) as { id: string }).id;
}
