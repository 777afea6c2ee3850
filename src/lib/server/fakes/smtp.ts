// A local SMTP server for the demo and tests: accepts every message on 127.0.0.1, keeps it in
// memory and (unless the database is in memory) as .eml + .json files in DATA_DIR/fake_mailbox,
// where an end-to-end test running in another process can read it. Never used when SMTP_URL is set.
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import PostalMime from 'postal-mime';
import { SMTPServer } from 'smtp-server';

export type FakeMail = {
	id: string;
	receivedAt: string;
	envelopeFrom: string;
	envelopeTo: string[];
	from: string;
	to: string;
	subject: string;
	text: string;
	html: string | null;
	messageId: string | null;
	/** Our queue's id, from the X-Tidemark-Mail-Id header. */
	mailId: string | null;
};

export type FakeSmtp = {
	url: string;
	port: number;
	/** Folder holding the received messages, or null when they are kept in memory only. */
	dir: string | null;
	messages: FakeMail[];
	/** Resolves with the first message (already received or arriving) that matches. */
	waitFor: (match: (m: FakeMail) => boolean, timeoutMs?: number) => Promise<FakeMail>;
	stop: () => Promise<void>;
};

export type FakeSmtpOptions = {
	dir?: string | null;
	/** Recipients refused with a permanent 550, to try how the app handles a bounce. */
	rejectRecipients?: RegExp;
};

const addressList = (a: { address?: string; name?: string }[] | undefined) =>
	(a ?? []).map((x) => (x.name ? `${x.name} <${x.address}>` : (x.address ?? ''))).join(', ');

export async function startFakeSmtp(options: FakeSmtpOptions = {}): Promise<FakeSmtp> {
	const dir = options.dir ?? null;
	if (dir) fs.mkdirSync(dir, { recursive: true });
	const messages: FakeMail[] = [];
	const waiters = new Set<(m: FakeMail) => void>();

	const server = new SMTPServer({
		// No AUTH: nodemailer would otherwise try to log in and fail without credentials. No
		// STARTTLS: the fake has no certificate, and it only listens on 127.0.0.1.
		authOptional: true,
		disabledCommands: ['AUTH', 'STARTTLS'],
		size: 10 * 1024 * 1024,
		banner: 'Tidemark local test mail server',
		// On stop, do not wait the default 30 s for idle client connections.
		closeTimeout: 500,
		logger: false,
		onRcptTo(address, _session, cb) {
			if (options.rejectRecipients?.test(address.address)) {
				const err = Object.assign(new Error('Mailbox unavailable (refused by the test server)'), {
					responseCode: 550
				});
				return cb(err);
			}
			cb();
		},
		onData(stream, session, cb) {
			const chunks: Buffer[] = [];
			stream.on('data', (c: Buffer) => chunks.push(c));
			stream.on('end', async () => {
				try {
					const raw = Buffer.concat(chunks);
					const parsed = await PostalMime.parse(raw);
					const header = (name: string) => parsed.headers.find((h) => h.key === name)?.value ?? null;
					const mail: FakeMail = {
						id: crypto.randomUUID(),
						receivedAt: new Date().toISOString(),
						envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
						envelopeTo: session.envelope.rcptTo.map((r) => r.address),
						from: addressList(parsed.from ? [parsed.from as { address?: string; name?: string }] : []),
						to: addressList(parsed.to as { address?: string; name?: string }[] | undefined),
						subject: parsed.subject ?? '',
						text: parsed.text ?? '',
						html: parsed.html ?? null,
						messageId: parsed.messageId ?? null,
						mailId: header('x-tidemark-mail-id')
					};
					if (dir) {
						const base = path.join(dir, `${mail.receivedAt.replace(/[:.]/g, '-')}-${mail.id}`);
						fs.writeFileSync(`${base}.eml`, raw);
						fs.writeFileSync(`${base}.json`, JSON.stringify(mail, null, 2));
					}
					messages.push(mail);
					for (const w of waiters) w(mail);
					cb();
				} catch (e) {
					cb(e as Error);
				}
			});
		}
	});
	server.on('error', (e) => console.error('[fake smtp]', e.message));

	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(0, '127.0.0.1', () => resolve());
	});
	const port = (server.server.address() as AddressInfo).port;

	return {
		url: `smtp://127.0.0.1:${port}`,
		port,
		dir,
		messages,
		waitFor(match, timeoutMs = 10_000) {
			const found = messages.find(match);
			if (found) return Promise.resolve(found);
			return new Promise((resolve, reject) => {
				const timer = setTimeout(() => {
					waiters.delete(check);
					reject(new Error(`No matching mail arrived at the fake SMTP server within ${timeoutMs} ms.`));
				}, timeoutMs);
				const check = (m: FakeMail) => {
					if (!match(m)) return;
					clearTimeout(timer);
					waiters.delete(check);
					resolve(m);
				};
				waiters.add(check);
			});
		},
		stop: () => new Promise<void>((resolve) => server.close(() => resolve()))
	};
}

/** The messages a fake SMTP server stored in `dir`, oldest first (for tests in another process). */
export function readMailbox(dir: string): FakeMail[] {
	if (!fs.existsSync(dir)) return [];
	return fs
		.readdirSync(dir)
		.filter((f) => f.endsWith('.json'))
		.sort()
		.map((f) => JSON.parse(fs.readFileSync(path.join(dir, f), 'utf8')) as FakeMail);
}
