import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { outgoingMail } from '$lib/server/db/schema/mail';
import * as staff from '$lib/server/staff/queries';
import { readMailbox, startFakeSmtp, type FakeSmtp } from '$lib/server/fakes/smtp';
import { enqueue } from './queue';
import { backoffMs, processDue, startMailWorker } from './worker';
import * as outbox from './outbox';
import { testMessage } from './templates';

// Runs against a real in-memory PGlite and a real SMTP server (smtp-server) on 127.0.0.1, which
// nodemailer reaches over TCP exactly as it would reach a shop's mail provider.

/** A port nothing listens on: bound by us, then released. */
function closedPort(): Promise<number> {
	return new Promise((resolve) => {
		const srv = net.createServer().listen(0, '127.0.0.1', () => {
			const { port } = srv.address() as net.AddressInfo;
			srv.close(() => resolve(port));
		});
	});
}

let smtp: FakeSmtp;
let leadId: string;
const mailDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-mailbox-'));
const shop = { name: 'Harbour Board Repairs' };

async function row(id: string) {
	const db = await getDb();
	const [r] = await db.select().from(outgoingMail).where(eq(outgoingMail.id, id));
	return r;
}

async function queueOne(to = 'mira.okonkwo@example.test') {
	const db = await getDb();
	return enqueue(db, {
		to,
		...testMessage({ shop, sentBy: 'Ada Quill' }),
		related: { type: 'job', id: 'J-0042' }
	});
}

beforeAll(async () => {
	smtp = await startFakeSmtp({ dir: mailDir, rejectRecipients: /@bounce\.test$/ });
	const lead = await staff.create(null, {
		name: 'Ada Quill',
		email: 'ada@shop.test',
		role: 'lead',
		password: 'first-lead-pw'
	});
	leadId = lead.id;
});

afterAll(async () => {
	await smtp?.stop();
	fs.rmSync(mailDir, { recursive: true, force: true });
});

describe('enqueue', () => {
	it('writes inside the caller’s transaction: a rolled-back request leaves no mail', async () => {
		const db = await getDb();
		let id = '';
		await expect(
			db.transaction(async (tx) => {
				({ id } = await enqueue(tx, { to: 'x@example.test', subject: 'S', text: 'T', template: 'test' }));
				throw new Error('the request failed after queueing');
			})
		).rejects.toThrow('the request failed');
		expect(id).not.toBe('');
		expect(await row(id)).toBeUndefined();
	});

	it('queues without sending, refuses a bad address and keeps a subject on one line', async () => {
		const before = smtp.messages.length;
		const { id } = await queueOne();
		expect(await row(id)).toMatchObject({
			status: 'queued',
			attempts: 0,
			relatedType: 'job',
			relatedId: 'J-0042'
		});
		expect(smtp.messages.length).toBe(before);
		const db = await getDb();
		await expect(
			enqueue(db, { to: 'not-an-address', subject: 'S', text: 'T', template: 'test' })
		).rejects.toThrow();
		// A line break or other control character would start a header of the sender's choosing.
		const injected = await enqueue(db, {
			to: 'a@example.test',
			subject: 'S\r\nBcc: x@evil.test\u0085\u2028X-Extra: 1\u0007',
			text: 'T',
			template: 'test'
		});
		expect((await row(injected.id)).subject).toBe('S Bcc: x@evil.test X-Extra: 1');
		// Leave the queue empty for the next tests.
		await db.delete(outgoingMail);
	});
});

describe('the worker against an SMTP server', () => {
	it('retries a mail the server cannot take, then marks it failed with the error; a retry sends it', async () => {
		process.env.SMTP_URL = `smtp://127.0.0.1:${await closedPort()}`;
		const { id } = await queueOne();
		const opts = { maxAttempts: 3, backoff: () => 0 };

		expect(await processDue(opts)).toMatchObject({ claimed: 1, retrying: 1, sent: 0 });
		let r = await row(id);
		expect(r).toMatchObject({ status: 'queued', attempts: 1 });
		expect(r.lastError).toMatch(/ECONNREFUSED/);

		expect(await processDue(opts)).toMatchObject({ claimed: 1, retrying: 1 });
		expect(await processDue(opts)).toMatchObject({ claimed: 1, failed: 1 });
		r = await row(id);
		expect(r).toMatchObject({ status: 'failed', attempts: 3, sentAt: null });
		expect(r.lastError).toMatch(/ECONNREFUSED/);
		expect(await processDue(opts)).toMatchObject({ claimed: 0 });

		// The lead fixes the setting and presses "retry now".
		process.env.SMTP_URL = smtp.url;
		await outbox.retryNow(leadId, id);
		expect(await row(id)).toMatchObject({ status: 'queued', attempts: 0 });
		expect(await processDue(opts)).toMatchObject({ claimed: 1, sent: 1 });
		r = await row(id);
		expect(r).toMatchObject({ status: 'sent', attempts: 1, lastError: null });
		expect(r.sentAt).toBeInstanceOf(Date);

		const received = await smtp.waitFor((m) => m.mailId === id);
		expect(received.envelopeTo).toEqual(['mira.okonkwo@example.test']);
		expect(received.subject).toBe('Test message from Harbour Board Repairs');
		expect(received.text).toContain('sent by Ada Quill');
		expect(received.html).toContain('<p style="margin:0 0 16px">If you can read it');
		expect(r.messageId).toBe(received.messageId);

		const db = await getDb();
		const [audit] = await db.select().from(auditLog).where(eq(auditLog.targetId, id));
		expect(audit).toMatchObject({ action: 'mail.retry', actorId: leadId, details: { attempts: 3 } });
		// The mailbox folder holds the message for tests in another process.
		expect(readMailbox(mailDir).map((m) => m.mailId)).toContain(id);
	});

	it('waits out the back-off before trying again', async () => {
		process.env.SMTP_URL = `smtp://127.0.0.1:${await closedPort()}`;
		const { id } = await queueOne();
		const t0 = new Date();
		await processDue({ now: () => t0 });
		const r = await row(id);
		expect(r.nextAttemptAt.getTime() - t0.getTime()).toBe(30_000);
		expect(await processDue({ now: () => new Date(t0.getTime() + 29_000) })).toMatchObject({ claimed: 0 });
		expect(await processDue({ now: () => new Date(t0.getTime() + 31_000) })).toMatchObject({ claimed: 1 });
		const db = await getDb();
		await db.delete(outgoingMail);
	});

	it('doubles the back-off per attempt up to an hour', () => {
		expect([1, 2, 3, 4, 5, 8, 20].map(backoffMs)).toEqual([
			30e3, 60e3, 120e3, 240e3, 480e3, 3_600e3, 3_600e3
		]);
	});

	it('gives up at once on a permanent refusal (5xx) and keeps the server’s words', async () => {
		process.env.SMTP_URL = smtp.url;
		const { id } = await queueOne('nobody@bounce.test');
		expect(await processDue()).toMatchObject({ claimed: 1, failed: 1 });
		const r = await row(id);
		expect(r).toMatchObject({ status: 'failed', attempts: 1 });
		expect(r.lastError).toMatch(/550.*Mailbox unavailable/);
	});

	it('refuses to retry a mail that has not failed', async () => {
		const { id } = await queueOne();
		await expect(outbox.retryNow(leadId, id)).rejects.toThrow(
			'Only a failed mail can be retried; this one is queued.'
		);
		const db = await getDb();
		await db.delete(outgoingMail);
	});

	it('runs in the background once started, woken by enqueue, and stops cleanly', async () => {
		process.env.SMTP_URL = smtp.url;
		const worker = startMailWorker({ intervalMs: 60_000 });
		try {
			const { id } = await queueOne('later@example.test');
			const received = await smtp.waitFor((m) => m.mailId === id, 5000);
			expect(received.envelopeTo).toEqual(['later@example.test']);
		} finally {
			await worker.stop();
		}
		expect((await outbox.counts()).sent).toBeGreaterThanOrEqual(1);
	});

	it('leaves mail queued, untouched, while no SMTP server is configured', async () => {
		delete process.env.SMTP_URL;
		const { id } = await queueOne();
		expect(await processDue()).toMatchObject({ claimed: 0, skipped: 'SMTP_URL is not set' });
		expect(await row(id)).toMatchObject({ status: 'queued', attempts: 0 });
	});
});
