// Test harness of the payments specs (not imported by the app): the webhook's processing (what
// the route /api/payments/webhook answers with) behind a local HTTP server, the local payments fake started the way the app starts it, and the fake's
// checkout page "clicked" over HTTP.
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { expect } from 'vitest';
import Stripe from 'stripe';
import { runningFakes, startFakes, stopFakes } from '$lib/server/fakes';
import type { FakePayments } from '$lib/server/fakes/payments';
import { processWebhook } from './webhook';

/** Signs test payloads the way the service does (no key is used for signing). */
export const signer = new Stripe('sk_test_unused');

/** Hands a body with a given signature header straight to the webhook, as an attacker could. */
export async function postWebhook(payload: string, signature: string | null) {
	return processWebhook(payload, signature);
}

/**
 * Starts a server that hands every request to the webhook's processing, points PUBLIC_BASE_URL at
 * it (the fake posts its signed events there), and starts the fakes with no real keys set.
 */
export async function startWebhookHarness(): Promise<{ fake: FakePayments; stop: () => Promise<void> }> {
	const app = http.createServer(async (req, res) => {
		const chunks: Buffer[] = [];
		for await (const c of req) chunks.push(c as Buffer);
		const { status, body } = await postWebhook(
			Buffer.concat(chunks).toString('utf8'),
			(req.headers['stripe-signature'] as string) ?? null
		);
		res.writeHead(status, { 'content-type': 'application/json' }).end(JSON.stringify(body));
	});
	await new Promise<void>((r) => app.listen(0, '127.0.0.1', () => r()));
	process.env.PUBLIC_BASE_URL = `http://127.0.0.1:${(app.address() as AddressInfo).port}`;
	process.env.TIDEMARK_FAKES = '1';
	delete process.env.STRIPE_SECRET_KEY;
	delete process.env.SMTP_URL;
	await startFakes();
	return {
		fake: runningFakes().payments!,
		stop: async () => {
			await stopFakes();
			await new Promise((r) => app.close(r));
		}
	};
}

/** Clicks a button on the fake's checkout page (after checking the page offers it). */
export async function pay(url: string, outcome: 'succeed' | 'decline' | 'cancel') {
	const page = await fetch(url);
	expect(page.status).toBe(200);
	expect(await page.text()).toContain(`value="${outcome}"`);
	return fetch(url, { method: 'POST', body: new URLSearchParams({ outcome }), redirect: 'manual' });
}
