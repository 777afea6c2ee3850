import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startWebhookHarness } from '$lib/server/payments/fixtures';
import { POST } from './+server';

// The route is a thin wrapper over $lib/server/payments/webhook (whose spec signs real events):
// here only that it reads the raw body and the signature header and answers JSON with the status.
const post = (headers: Record<string, string>) =>
	POST({
		request: new Request('http://app.test/api/payments/webhook', { method: 'POST', body: '{}', headers })
	} as Parameters<typeof POST>[0]);

describe('POST /api/payments/webhook', () => {
	let harness: Awaited<ReturnType<typeof startWebhookHarness>>;
	beforeAll(async () => {
		harness = await startWebhookHarness(); // sets the payments fake up, with its webhook secret
	});
	afterAll(() => harness.stop());

	it('answers an unsigned call 400 with a JSON reason', async () => {
		const res = await post({ 'content-type': 'application/json' });
		expect(res.status).toBe(400);
		expect(await res.json()).toEqual({ received: false, message: 'Missing signature.' });
	});

	it('passes the signature header on: a garbled one is refused as a bad signature', async () => {
		const res = await post({ 'content-type': 'application/json', 'stripe-signature': 't=1,v1=garbage' });
		expect(res.status).toBe(400);
		expect(await res.json()).toEqual({ received: false, message: 'Bad signature.' });
	});
});
