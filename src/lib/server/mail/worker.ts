import nodemailer, { type Transporter } from 'nodemailer';
import { and, asc, eq, inArray, lt, lte, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { outgoingMail, type OutgoingMail } from '$lib/server/db/schema/mail';
import { mailFrom, smtpUrl } from './config';
import { setWake } from './queue';

/** Attempts before a mail is given up as failed (the lead can still retry it from the Outbox). */
export const MAX_ATTEMPTS = 5;

/** Wait before attempt n+1 after n failed attempts: 30 s, 1, 2, 4 min … capped at one hour. */
export function backoffMs(attempts: number): number {
	return Math.min(60 * 60_000, 30_000 * 2 ** Math.max(0, attempts - 1));
}

/** A 'sending' row older than this was left behind by a stopped process and is taken back. */
const STALE_SENDING_MS = 10 * 60_000;

export type SendFn = (mail: OutgoingMail) => Promise<{ messageId?: string }>;

export type ProcessOptions = {
	maxAttempts?: number;
	backoff?: (attempts: number) => number;
	batchSize?: number;
	/** How to send; by default nodemailer over SMTP_URL (or the local fake's address). */
	send?: SendFn;
	now?: () => Date;
};

export type PassResult = {
	claimed: number;
	sent: number;
	retrying: number;
	failed: number;
	skipped?: string;
};

// One transporter per SMTP address, reused between passes (nodemailer opens a connection per send).
const transports = new Map<string, Transporter>();

function transportFor(url: string): Transporter {
	let t = transports.get(url);
	if (!t) {
		const u = new URL(url);
		// Without these a silent server holds a send for minutes (nodemailer's defaults are 2 min / 10 min).
		const defaults = { connectionTimeout: '10000', greetingTimeout: '10000', socketTimeout: '30000' };
		for (const [k, v] of Object.entries(defaults)) if (!u.searchParams.has(k)) u.searchParams.set(k, v);
		t = nodemailer.createTransport(u.toString());
		transports.set(url, t);
	}
	return t;
}

export function closeTransports() {
	for (const t of transports.values()) t.close();
	transports.clear();
}

export const smtpSend: SendFn = async (mail) => {
	const url = smtpUrl();
	if (!url) throw new Error('No SMTP server is configured (SMTP_URL is not set).');
	const info = await transportFor(url).sendMail({
		from: mailFrom(),
		to: mail.to,
		subject: mail.subject,
		text: mail.text,
		html: mail.html ?? undefined,
		headers: { 'X-Tidemark-Mail-Id': mail.id }
	});
	return { messageId: info.messageId };
};

/** The error as staff should read it, e.g. "ESOCKET: connect ECONNREFUSED 127.0.0.1:9". */
function describeError(e: unknown): string {
	if (!(e instanceof Error)) return String(e).slice(0, 1000);
	const code = (e as { code?: string }).code;
	return (code && !e.message.includes(code) ? `${code}: ${e.message}` : e.message).slice(0, 1000);
}

/** 5xx replies are final (unknown recipient, refused content); sending again would not help. */
function isPermanent(e: unknown): boolean {
	const status = (e as { responseCode?: number }).responseCode;
	return typeof status === 'number' && status >= 500 && status < 600;
}

/**
 * One pass of the queue: take back stale claims, claim due mails (skipping rows another process
 * holds), send each, and record the outcome. Safe to call from tests directly.
 */
export async function processDue(options: ProcessOptions = {}): Promise<PassResult> {
	const { maxAttempts = MAX_ATTEMPTS, backoff = backoffMs, batchSize = 20, now = () => new Date() } = options;
	const send = options.send ?? smtpSend;
	const result: PassResult = { claimed: 0, sent: 0, retrying: 0, failed: 0 };
	if (!options.send && !smtpUrl()) return { ...result, skipped: 'SMTP_URL is not set' };

	const db = await getDb();
	const t = now();
	await db
		.update(outgoingMail)
		.set({ status: 'queued', updatedAt: t })
		.where(
			and(
				eq(outgoingMail.status, 'sending'),
				lt(outgoingMail.updatedAt, new Date(t.getTime() - STALE_SENDING_MS))
			)
		);

	const due = db
		.select({ id: outgoingMail.id })
		.from(outgoingMail)
		.where(and(eq(outgoingMail.status, 'queued'), lte(outgoingMail.nextAttemptAt, t)))
		.orderBy(asc(outgoingMail.nextAttemptAt), asc(outgoingMail.createdAt))
		.limit(batchSize)
		.for('update', { skipLocked: true });
	const claimed = await db
		.update(outgoingMail)
		.set({ status: 'sending', attempts: sql`${outgoingMail.attempts} + 1`, updatedAt: t })
		.where(inArray(outgoingMail.id, due))
		.returning();
	result.claimed = claimed.length;

	for (const mail of claimed) {
		try {
			const { messageId } = await send(mail);
			await db
				.update(outgoingMail)
				.set({
					status: 'sent',
					sentAt: now(),
					updatedAt: now(),
					lastError: null,
					messageId: messageId ?? null
				})
				.where(eq(outgoingMail.id, mail.id));
			result.sent++;
		} catch (e) {
			const giveUp = mail.attempts >= maxAttempts || isPermanent(e);
			const at = now();
			await db
				.update(outgoingMail)
				.set({
					status: giveUp ? 'failed' : 'queued',
					lastError: describeError(e),
					nextAttemptAt: giveUp ? at : new Date(at.getTime() + backoff(mail.attempts)),
					updatedAt: at
				})
				.where(eq(outgoingMail.id, mail.id));
			if (giveUp) result.failed++;
			else result.retrying++;
		}
	}
	return result;
}

export type MailWorker = { stop: () => Promise<void>; wake: () => void };

/**
 * The background loop: a pass every `intervalMs`, at once again while batches come back full, and
 * soon after enqueue() wakes it. stop() waits for the pass in flight, so shutdown loses no outcome.
 */
export function startMailWorker(options: ProcessOptions & { intervalMs?: number } = {}): MailWorker {
	const { intervalMs = 2000, ...passOptions } = options;
	const batchSize = passOptions.batchSize ?? 20;
	let stopped = false;
	let timer: ReturnType<typeof setTimeout> | null = null;
	let inFlight: Promise<void> | null = null;

	const schedule = (ms: number) => {
		if (stopped) return;
		if (timer) clearTimeout(timer);
		timer = setTimeout(run, ms);
		timer.unref?.();
	};

	function run() {
		timer = null;
		if (stopped || inFlight) return;
		inFlight = processDue(passOptions)
			.then((r) => schedule(r.claimed >= batchSize ? 0 : intervalMs))
			.catch((e) => {
				console.error('[mail] queue pass failed:', e);
				schedule(intervalMs * 5);
			})
			.finally(() => {
				inFlight = null;
			});
	}

	const wake = () => {
		if (!inFlight) schedule(0);
	};
	setWake(wake);
	schedule(0);

	return {
		wake,
		stop: async () => {
			stopped = true;
			if (timer) clearTimeout(timer);
			setWake(null);
			await inFlight;
			closeTransports();
		}
	};
}

// The server's one background sender, started and stopped by startup()/shutdown().
let background: MailWorker | null = null;

/** Start-up step: sends queued mail in the background. */
export function startBackgroundMail() {
	background ??= startMailWorker();
}

/** Shutdown step: waits for the pass in flight, then stops. */
export async function stopBackgroundMail() {
	const worker = background;
	background = null;
	await worker?.stop();
}
