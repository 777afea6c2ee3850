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

type WalkStep = {
	kind: string;
	outcomes?: { label: string; next: string }[];
	ranges?: { min?: number; max?: number; next: string }[];
	domain?: { min?: number; max?: number };
};

/**
 * Walks a run to a verdict through the API without knowing the flow: at each step it prefers an
 * answer that leads straight to a verdict, then one to a step not seen yet, so it ends whatever
 * the flow's wording or step ids. Returns the verdict step's id.
 */
export async function walkToVerdict(page: Page, runId: string) {
	const res = await page.request.get(`/api/runs/${runId}`);
	expect(res.status(), await res.text()).toBe(200);
	const run = (await res.json()) as {
		currentStep: string;
		flow: { definition: { steps: Record<string, WalkStep> } };
	};
	const steps = run.flow.definition.steps;
	let step = run.currentStep;
	const seen = new Set([step]);
	for (let i = 0; i < 100 && steps[step].kind !== 'verdict'; i++) {
		const s = steps[step];
		const exits = (s.outcomes ?? s.ranges ?? []).map((e, index) => ({ e, index }));
		const pick =
			exits.find(({ e }) => steps[e.next]?.kind === 'verdict') ??
			exits.find(({ e }) => !seen.has(e.next)) ??
			exits[0];
		const event = s.outcomes
			? { type: 'ANSWER', outcome: pick.index }
			: { type: 'MEASURE', value: readingIn(pick.e as { min?: number; max?: number }, s.domain) };
		const r = await page.request.post(`/api/runs/${runId}/events`, {
			data: { ...event, stepId: step, idempotencyKey: `walk-${runId}-${i}` }
		});
		expect(r.status(), await r.text()).toBe(200);
		step = ((await r.json()) as { state: { currentStep: string } }).state.currentStep;
		seen.add(step);
	}
	expect(steps[step].kind).toBe('verdict');
	return step;
}

/** A reading inside a half-open range [min, max) and the step's domain. */
function readingIn(range: { min?: number; max?: number }, domain: { min?: number; max?: number } = {}) {
	const lo = range.min ?? domain.min;
	const hi = range.max ?? domain.max;
	if (lo !== undefined && hi !== undefined) return (lo + hi) / 2;
	if (lo !== undefined) return lo + 1;
	if (hi !== undefined) return hi - 1;
	return 0;
}
