// Where mail goes: SMTP_URL when set; otherwise the local fake SMTP server's address once the app
// has started it (demo and tests only, see fakes/index.ts); otherwise nowhere, and mail stays queued.
import { env } from '$lib/server/env';

const g = globalThis as unknown as { __tidemarkFakeSmtpUrl?: string | null };

export function smtpUrl(): string | null {
	return env().SMTP_URL || g.__tidemarkFakeSmtpUrl || null;
}

export function usingFakeSmtp(): boolean {
	return !env().SMTP_URL && Boolean(g.__tidemarkFakeSmtpUrl);
}

/** Called by the fake SMTP start-up (and tests) to route mail to it; null when it stops. */
export function setFakeSmtpUrl(url: string | null) {
	g.__tidemarkFakeSmtpUrl = url;
}

/** Start-up: says once that mail will wait in the queue (the Outbox says so too). */
export function warnIfNoMailServer() {
	if (!smtpUrl())
		console.warn('[mail] SMTP_URL is not set: e-mail stays queued until it is (see the Outbox).');
}

/** The sender. A real SMTP relay usually insists on an address of the shop's own domain: set MAIL_FROM. */
export function mailFrom(): string {
	return env().MAIL_FROM;
}

/** The SMTP address for staff to see, without the password. */
export function describeSmtpUrl(url: string | null): string | null {
	if (!url) return null;
	try {
		const u = new URL(url);
		if (u.password) u.password = '•••';
		u.search = '';
		return u.toString();
	} catch {
		return 'an SMTP_URL that is not a valid URL';
	}
}
