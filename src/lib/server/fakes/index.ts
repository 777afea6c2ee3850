// Local stand-ins for the hosted services (mail, payments), started by the app itself in the demo
// and in tests — each only when its real configuration is absent, bound to 127.0.0.1 on a free
// port, and stopped on shutdown.
import path from 'node:path';
import { dataDir } from '$lib/server/db';
import { setFakeSmtpUrl } from '$lib/server/mail/config';
import { setFakePayments } from '$lib/server/payments/config';
import { absoluteUrl } from '$lib/server/public-url';
import { startFakeSmtp, type FakeSmtp } from './smtp';
import { startFakePayments, type FakePayments } from './payments';
import { env } from '$lib/server/env';

export function fakesAllowed(): boolean {
	return env().TIDEMARK_DEMO || env().TIDEMARK_FAKES;
}

/** Where the fake SMTP server keeps what it received; null when the database is in memory too. */
export function fakeMailboxDir(): string | null {
	const dir = dataDir();
	return dir.startsWith('memory://') ? null : path.resolve(dir, 'fake_mailbox');
}

type Running = { smtp: FakeSmtp | null; payments: FakePayments | null };
const g = globalThis as unknown as { __tidemarkFakes?: Running };

export function runningFakes(): Running {
	return g.__tidemarkFakes ?? { smtp: null, payments: null };
}

export async function startFakes(): Promise<Running> {
	if (g.__tidemarkFakes) return g.__tidemarkFakes;
	const running: Running = { smtp: null, payments: null };
	if (!fakesAllowed()) return running;
	if (!env().SMTP_URL) {
		// Refuses the reserved .invalid domain (RFC 2606) with a permanent 550, like a real server
		// refusing a domain that cannot exist, so a bounce can be shown and tested.
		running.smtp = await startFakeSmtp({ dir: fakeMailboxDir(), rejectRecipients: /\.invalid$/i });
		setFakeSmtpUrl(running.smtp.url);
		console.log(
			`[fakes] local SMTP server on ${running.smtp.url}${running.smtp.dir ? `, mailbox ${running.smtp.dir}` : ''}`
		);
	}
	if (!env().STRIPE_SECRET_KEY) {
		running.payments = await startFakePayments({ webhookUrl: () => absoluteUrl('/api/payments/webhook') });
		const { secretKey, webhookSecret, host, port } = running.payments;
		setFakePayments({ secretKey, webhookSecret, endpoint: { host, port, protocol: 'http' } });
		console.log(`[fakes] local payment service on ${running.payments.url}`);
	}
	g.__tidemarkFakes = running;
	return running;
}

export async function stopFakes() {
	const running = g.__tidemarkFakes;
	g.__tidemarkFakes = undefined;
	if (!running) return;
	if (running.smtp) setFakeSmtpUrl(null);
	if (running.payments) setFakePayments(null);
	await Promise.all([running.smtp?.stop(), running.payments?.stop()]);
}
