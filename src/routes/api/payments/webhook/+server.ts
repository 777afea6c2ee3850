import { json } from '@sveltejs/kit';
import { processWebhook, type WebhookResponse } from '$lib/server/payments/webhook';
import type { RequestHandler } from './$types';

export type PaymentWebhookResponse = WebhookResponse;

// Public (allow-listed): the payment service calls it without a session. It is authenticated by the
// service's signature over the raw body, checked with the SDK before anything is read or changed.
export const POST: RequestHandler = async (event) => {
	const body = await event.request.text();
	const result = await processWebhook(body, event.request.headers.get('stripe-signature'));
	return json(result.body satisfies PaymentWebhookResponse, { status: result.status });
};
