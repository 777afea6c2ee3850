import Stripe from 'stripe';
import { env } from '$lib/server/env';
import { RuleError } from '$lib/server/errors';

/**
 * How the app reaches the payment service: STRIPE_SECRET_KEY and STRIPE_WEBHOOK_SECRET when set;
 * otherwise the local fake's own key, secret and address once the app has started it (demo and
 * tests only, see fakes/index.ts); otherwise payments are off.
 */
export type PaymentsConfig = {
	secretKey: string;
	webhookSecret: string | null;
	/** Set only for the local fake: the SDK's host/port/protocol options point at it. */
	endpoint?: { host: string; port: number; protocol: 'http' | 'https' };
	fake: boolean;
};

const g = globalThis as unknown as {
	__tidemarkFakePayments?: PaymentsConfig | null;
	__tidemarkStripe?: { key: string; client: Stripe };
};

export function paymentsConfig(): PaymentsConfig | null {
	const { STRIPE_SECRET_KEY: secretKey, STRIPE_WEBHOOK_SECRET } = env();
	if (secretKey) return { secretKey, webhookSecret: STRIPE_WEBHOOK_SECRET ?? null, fake: false };
	return g.__tidemarkFakePayments ?? null;
}

/** Start-up: a real key without the webhook's signing secret means payments never confirm. */
export function warnIfNoWebhookSecret() {
	const { STRIPE_SECRET_KEY, STRIPE_WEBHOOK_SECRET } = env();
	if (STRIPE_SECRET_KEY && !STRIPE_WEBHOOK_SECRET)
		console.warn('[payments] STRIPE_WEBHOOK_SECRET is not set: payment confirmations will be refused.');
}

/** Called when the local fake starts (and stops: null). */
export function setFakePayments(config: Omit<PaymentsConfig, 'fake'> | null) {
	g.__tidemarkFakePayments = config ? { ...config, fake: true } : null;
	g.__tidemarkStripe = undefined;
}

/** Asked to charge or refund with no payment service set up: a 503 the person can act on. */
export const paymentsNotConfigured = () =>
	new RuleError(
		503,
		'payments-not-configured',
		'Payments are not set up: set STRIPE_SECRET_KEY and STRIPE_WEBHOOK_SECRET.'
	);

/** The SDK client for the current configuration, made once per configuration. */
export function paymentsClient(): Stripe {
	const config = paymentsConfig();
	if (!config) throw paymentsNotConfigured();
	const key = JSON.stringify([config.secretKey, config.endpoint]);
	if (g.__tidemarkStripe?.key !== key) {
		const client = new Stripe(config.secretKey, {
			...(config.endpoint ?? {}),
			maxNetworkRetries: 2,
			timeout: 20_000,
			telemetry: false,
			appInfo: { name: 'Tidemark' }
		});
		g.__tidemarkStripe = { key, client };
	}
	return g.__tidemarkStripe.client;
}
