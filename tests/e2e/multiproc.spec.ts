/**
 * Two app processes on one PostgreSQL server (`node build` twice, different ports, one
 * DATABASE_URL): step events for the same runs sent to both in turn (and each one to both at once,
 * as a retrying phone would), test mails queued from both, and the same payment webhook delivered
 * to both. Every event is stored once and in order, every mail sent once, every payment applied
 * once. Runs in CI's PostgreSQL lane (TEST_DATABASE_URL, set by .ci/run); skipped without it.
 */
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect, test } from '@playwright/test';
import pg from 'pg';
import Stripe from 'stripe';
import { dryLonger, loopStep, restartLoopFlow, toCleanAndDry } from '../../src/lib/server/runs/walks';
import { testImei } from './helpers';
import { startApp, startMailSink, type App, type MailSink } from './multiproc-servers';

const adminUrl = process.env.TEST_DATABASE_URL;
const WEBHOOK_SECRET = 'whsec_multiproc_test_secret';
const RUNS = 6;
type Mail = { id: string; to: string; status: string };
const ROUNDS = 12;

test.describe.serial('two server processes on one PostgreSQL database', () => {
	test.skip(!adminUrl, 'needs TEST_DATABASE_URL (a PostgreSQL server; .ci/run starts one)');
	test.setTimeout(240_000);

	const dbName = `tidemark_multiproc_${randomUUID().slice(0, 8)}`;
	let db: pg.Pool;
	let sink: MailSink;
	let apps: App[] = [];
	const dataDirs: string[] = [];
	/** The runs the step-event test walked to the loop step. */
	const walked: string[] = [];

	test.beforeAll(async () => {
		test.setTimeout(240_000);
		await admin(`create database ${dbName}`);
		const url = new URL(adminUrl!);
		url.pathname = `/${dbName}`;
		db = new pg.Pool({ connectionString: url.href, max: 3 });
		sink = await startMailSink();
		const env = {
			DATABASE_URL: url.href,
			SMTP_URL: sink.url,
			STRIPE_SECRET_KEY: 'sk_test_multiproc',
			STRIPE_WEBHOOK_SECRET: WEBHOOK_SECRET,
			TIDEMARK_DEMO: '1',
			TIDEMARK_DEMO_HISTORY: '0',
			DEMO_PASSWORD: 'multiproc-password'
		};
		for (let i = 0; i < 2; i++) dataDirs.push(fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-mp-')));
		// Both start at once on the empty database: migrations and seeds take turns.
		apps = await Promise.all(dataDirs.map((dir) => startApp({ dataDir: dir, env })));
	});

	test.afterAll(async () => {
		await Promise.all(apps.map((a) => a.stop()));
		await sink?.stop();
		await db?.end();
		if (adminUrl) await admin(`drop database if exists ${dbName} with (force)`);
		for (const dir of dataDirs) fs.rmSync(dir, { recursive: true, force: true });
	});

	test('start together on an empty database: one set of migrations and one demo shop', async () => {
		const migrations = await one<{ n: number }>(
			'select count(*)::int as n from drizzle.__drizzle_migrations'
		);
		const files = fs.readdirSync('drizzle').filter((f) => f.endsWith('.sql')).length;
		expect(migrations.n).toBe(files);
		const leads = await one<{ n: number }>(
			`select count(*)::int as n from users where email = 'lead@tidemark.test'`
		);
		expect(leads.n).toBe(1);
		for (const app of apps) {
			expect((await fetch(`${app.base}/api/health`)).status).toBe(200);
			expect(app.log(), 'every start-up task of both processes succeeded').not.toContain('[startup]');
		}
	});

	test('step events for the same runs, sent to both in turn and each to both at once: stored once, in order', async () => {
		const [a, b] = apps;
		const tech = await a.signIn('tech@tidemark.test');
		const runIds: string[] = [];
		for (let i = 0; i < RUNS; i++) {
			const job = await a.json('POST', '/api/jobs', tech, {
				customerName: 'Mara Quillon',
				customerEmail: 'mara@example.test',
				maker: 'Corvana',
				model: 'Tern 5',
				imei: testImei('0061'),
				symptoms: ['restart-loop'],
				liquid: 'fresh',
				submerged: false,
				passcodeStatus: 'withheld',
				consentToOpen: true
			});
			const run = await b.json('POST', '/api/runs', tech, { jobId: job.id, flowId: restartLoopFlow });
			runIds.push(run.id);
		}

		// Every run walks its path at the same time; event n goes first to process n % 2 and, at the
		// same moment, to the other one with the same key (a retry that reached the other process).
		const sent = new Map<string, string[]>();
		await Promise.all(
			runIds.map(async (runId) => {
				const keys: string[] = [];
				const events = [
					...toCleanAndDry.map(([stepId, outcome]) => ({ type: 'ANSWER', stepId, outcome })),
					...Array.from({ length: ROUNDS }, (_, i) =>
						i % 2
							? { type: 'BACK', stepId: loopStep }
							: { type: 'ANSWER', stepId: loopStep, outcome: dryLonger }
					)
				];
				for (const [n, event] of events.entries()) {
					const key = randomUUID();
					keys.push(key);
					const body = { ...event, idempotencyKey: key };
					const [first, second] = n % 2 ? [b, a] : [a, b];
					const answers = await Promise.all([
						first.json('POST', `/api/runs/${runId}/events`, tech, body),
						second.json('POST', `/api/runs/${runId}/events`, tech, body)
					]);
					expect(answers[1], 'both processes answer the same stored result').toEqual(answers[0]);
					expect(answers[0].seq).toBe(n + 1);
				}
				sent.set(runId, keys);
				walked.push(runId);
			})
		);

		for (const runId of runIds) {
			const { rows } = await db.query<{ seq: number; idempotency_key: string }>(
				'select seq, idempotency_key from run_steps where run_id = $1 order by seq',
				[runId]
			);
			expect(rows.map((r) => r.seq)).toEqual(rows.map((_, i) => i + 1));
			expect(rows.map((r) => r.idempotency_key)).toEqual(sent.get(runId));
		}
	});

	test("two different events for one run at once, one on each process: both kept, neither overwrites the other's standing", async () => {
		const [a, b] = apps;
		const tech = await b.signIn('tech@tidemark.test');
		const runId = walked[0];
		expect(runId, 'the step-event test ran first').toBeTruthy();
		for (let round = 0; round < 10; round++) {
			const send = (app: App) =>
				app.json('POST', `/api/runs/${runId}/events`, tech, {
					type: 'ANSWER',
					stepId: loopStep,
					outcome: dryLonger,
					idempotencyKey: randomUUID()
				});
			const [x, y] = await Promise.all([send(a), send(b)]);
			expect(Math.abs(x.seq - y.seq)).toBe(1);
			const later = x.seq > y.seq ? x : y;
			const run = await one<{ snapshot: unknown; n: number }>(
				`select snapshot, (select count(*)::int from run_steps where run_id = runs.id) as n from runs where id = $1`,
				[runId]
			);
			// The run row holds what the later of the two decided, and every step is there.
			expect(run.snapshot).toEqual(later.state.snapshot);
			expect(run.n).toBe(later.seq);
		}
	});

	test('test mails queued from both processes: each sent once, by one of the two workers', async () => {
		const [a, b] = apps;
		const sessions = [await a.signIn('lead@tidemark.test'), await b.signIn('lead@tidemark.test')];
		const queued = await Promise.all(
			Array.from({ length: 16 }, (_, i) =>
				apps[i % 2].form('/outbox?/test', sessions[i % 2], { to: `bench${i}@example.test` })
			)
		);
		expect(queued).toEqual(queued.map(() => 'success'));
		const rows = await allSent();
		expect(rows.filter((r) => r.to.startsWith('bench')).length).toBe(16);
		expectEachSentOnce(rows, (r) => r.to.startsWith('bench'));
	});

	test('the same payment webhook delivered to both processes, twice: applied once, one receipt sent once', async () => {
		const [a, b] = apps;
		const tech = await a.signIn('tech@tidemark.test');
		const signer = new Stripe('sk_test_multiproc');
		const payments: { id: string; quote: string; job: string; event: string; body: string }[] = [];
		for (let i = 0; i < 4; i++) {
			const job = await b.json('POST', '/api/jobs', tech, {
				customerName: 'Odile Brannock',
				customerEmail: `odile${i}@example.test`,
				maker: 'Corvana',
				model: 'Tern 5',
				imei: testImei('0062'),
				symptoms: ['restart-loop'],
				liquid: 'fresh',
				submerged: false,
				passcodeStatus: 'withheld',
				consentToOpen: true
			});
			const quote = await one<{ id: string }>(
				`insert into quotes (job_id, version, status, lines, currency, tax_rate_basis_points, prices_include_tax,
					net_minor, tax_minor, gross_minor, sent_at, approved_name, approved_at)
				values ($1, 1, 'approved', '[]', 'EUR', 0, true, 4500, 0, 4500, now(), 'Odile Brannock', now()) returning id`,
				[job.id]
			);
			const session = `cs_test_${randomUUID().replaceAll('-', '')}`;
			const payment = await one<{ id: string }>(
				`insert into payments (reference_type, reference_id, description, amount_minor, currency, provider_session_id)
					values ('job', $1, 'Diagnostic fee', 4500, 'eur', $2) returning id`,
				[`${job.id}:${quote.id}:fee`, session]
			);
			const event = `evt_${randomUUID().replaceAll('-', '')}`;
			const body = JSON.stringify({
				id: event,
				object: 'event',
				api_version: '2025-01-27.acacia',
				created: Math.floor(Date.now() / 1000),
				type: 'checkout.session.completed',
				livemode: false,
				pending_webhooks: 1,
				request: { id: null, idempotency_key: null },
				data: {
					object: {
						id: session,
						object: 'checkout.session',
						amount_total: 4500,
						currency: 'eur',
						client_reference_id: payment.id,
						metadata: { payment_id: payment.id },
						mode: 'payment',
						payment_intent: `pi_${randomUUID().slice(0, 8)}`,
						payment_status: 'paid',
						status: 'complete'
					}
				}
			});
			payments.push({ id: payment.id, quote: quote.id, job: job.id, event, body });
		}

		const deliver = (app: App, body: string) =>
			fetch(`${app.base}/api/payments/webhook`, {
				method: 'POST',
				headers: {
					'content-type': 'application/json',
					'stripe-signature': signer.webhooks.generateTestHeaderString({
						payload: body,
						secret: WEBHOOK_SECRET
					})
				},
				body
			}).then(async (r) => ({ status: r.status, body: await r.json() }));
		const answers = await Promise.all(
			payments.flatMap((p) => [
				deliver(a, p.body),
				deliver(b, p.body),
				deliver(b, p.body),
				deliver(a, p.body)
			])
		);
		expect(answers.every((r) => r.status === 200)).toBe(true);
		expect(answers.filter((r) => r.body.outcome === 'applied: paid')).toHaveLength(payments.length);
		expect(answers.filter((r) => r.body.duplicate)).toHaveLength(payments.length * 3);

		for (const p of payments) {
			const row = await one<{
				status: string;
				paid: number;
				events: number;
				audits: number;
				receipts: number;
			}>(
				`select p.status, q.paid_minor as paid,
					(select count(*)::int from payment_events where event_id = $2) as events,
					(select count(*)::int from audit_log where action = 'payment.paid' and target_id = $1::text) as audits,
					(select count(*)::int from outgoing_mail where related_id = $4::text and template = 'payment-receipt') as receipts
				from payments p, quotes q where p.id = $1::uuid and q.id = $3::uuid`,
				[p.id, p.event, p.quote, p.job]
			);
			expect(row).toEqual({ status: 'paid', paid: 4500, events: 1, audits: 1, receipts: 1 });
		}
		const rows = await allSent();
		expect(rows.filter((r) => r.to.startsWith('odile')).length).toBe(payments.length);
		expectEachSentOnce(rows, (r) => r.to.startsWith('odile'));
	});

	// Last: ten failures from one address block that address on both processes for 15 minutes.
	test('failed sign-ins counted on either process add up: ten across both block the account on both', async () => {
		// As the page's enhanced form posts it: the answer names the action's status.
		const attempt = (app: App, password: string) =>
			fetch(`${app.base}/signin`, {
				method: 'POST',
				headers: {
					'content-type': 'application/x-www-form-urlencoded',
					origin: `http://localhost:${app.port}`,
					'x-sveltekit-action': 'true'
				},
				body: new URLSearchParams({ email: 'senior@tidemark.test', password })
			})
				.then((r) => r.json())
				.then((r: { type: string; status?: number }) => r.status ?? r.type);
		for (let i = 0; i < 10; i++) expect(await attempt(apps[i % 2], `wrong-${i}`)).toBe(400);
		// Five failures on each process: either alone would still let the right password in.
		expect(await attempt(apps[0], 'multiproc-password')).toBe(429);
		expect(await attempt(apps[1], 'multiproc-password')).toBe(429);
	});

	async function admin(q: string) {
		const c = new pg.Client({ connectionString: adminUrl });
		await c.connect();
		await c.query(q);
		await c.end();
	}

	async function one<T>(q: string, params: unknown[] = []): Promise<T> {
		const { rows } = await db.query(q, params);
		return rows[0] as T;
	}

	/** Waits until no mail is queued or being sent, then returns every mail row. */
	async function allSent() {
		for (let i = 0; i < 200; i++) {
			const left = await one<{ n: number }>(
				`select count(*)::int as n from outgoing_mail where status in ('queued', 'sending')`
			);
			if (left.n === 0) break;
			await new Promise((r) => setTimeout(r, 250));
		}
		const { rows } = await db.query<Mail>('select id, "to", status from outgoing_mail');
		return rows;
	}

	/**
	 * The mail server received each sent row's message exactly once, and nothing else; `mine` (the
	 * rows this test queued) all went out.
	 */
	function expectEachSentOnce(rows: Mail[], mine: (r: Mail) => boolean) {
		expect(rows.filter((r) => mine(r) && r.status !== 'sent')).toEqual([]);
		const received = sink.received();
		expect(received.length - new Set(received).size, 'mails the server received twice').toBe(0);
		expect(new Set(received)).toEqual(new Set(rows.filter((r) => r.status === 'sent').map((r) => r.id)));
	}
});
