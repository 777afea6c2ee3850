import net from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import { smtpUrl, usingFakeSmtp } from '$lib/server/mail/config';
import { paymentsConfig } from '$lib/server/payments/config';
import { runningFakes, startFakes, stopFakes } from './index';

const saved = { ...process.env };
afterEach(async () => {
	await stopFakes();
	for (const k of [
		'TIDEMARK_DEMO',
		'TIDEMARK_FAKES',
		'SMTP_URL',
		'STRIPE_SECRET_KEY',
		'STRIPE_WEBHOOK_SECRET'
	]) {
		if (saved[k] === undefined) delete process.env[k];
		else process.env[k] = saved[k];
	}
});

const accepts = (port: number) =>
	new Promise<boolean>((resolve) => {
		const s = net.connect(port, '127.0.0.1');
		s.once('connect', () => (s.destroy(), resolve(true)));
		s.once('error', () => resolve(false));
	});

describe('starting the local fakes', () => {
	it('starts nothing outside the demo and tests', async () => {
		delete process.env.TIDEMARK_DEMO;
		delete process.env.TIDEMARK_FAKES;
		delete process.env.SMTP_URL;
		delete process.env.STRIPE_SECRET_KEY;
		expect(await startFakes()).toEqual({ smtp: null, payments: null });
		expect(smtpUrl()).toBeNull();
		expect(paymentsConfig()).toBeNull();
	});

	it('leaves real settings alone: a configured service gets no fake', async () => {
		process.env.TIDEMARK_FAKES = '1';
		process.env.SMTP_URL = 'smtp://mail.example.test:587';
		process.env.STRIPE_SECRET_KEY = 'sk_test_real';
		process.env.STRIPE_WEBHOOK_SECRET = 'whsec_real';
		expect(await startFakes()).toEqual({ smtp: null, payments: null });
		expect(smtpUrl()).toBe('smtp://mail.example.test:587');
		expect(paymentsConfig()).toEqual({ secretKey: 'sk_test_real', webhookSecret: 'whsec_real', fake: false });
	});

	it('starts both on 127.0.0.1 when allowed and unconfigured, and stops them', async () => {
		process.env.TIDEMARK_FAKES = '1';
		delete process.env.SMTP_URL;
		delete process.env.STRIPE_SECRET_KEY;
		const { smtp, payments } = await startFakes();
		expect(smtp!.url).toMatch(/^smtp:\/\/127\.0\.0\.1:\d+$/);
		expect(smtpUrl()).toBe(smtp!.url);
		expect(usingFakeSmtp()).toBe(true);
		expect(paymentsConfig()).toMatchObject({
			fake: true,
			endpoint: { host: '127.0.0.1', port: payments!.port, protocol: 'http' }
		});
		expect(await accepts(smtp!.port)).toBe(true);
		expect(await accepts(payments!.port)).toBe(true);

		await stopFakes();
		expect(runningFakes()).toEqual({ smtp: null, payments: null });
		expect(smtpUrl()).toBeNull();
		expect(paymentsConfig()).toBeNull();
		expect(await accepts(smtp!.port)).toBe(false);
		expect(await accepts(payments!.port)).toBe(false);
	});
});
