import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { expect, request, test, type APIRequestContext } from '@playwright/test';
import { accounts, password, testImei } from './helpers';

// kill -9 of the server while sixteen clients send step events, measure readings and photos: on
// restart every write the server acknowledged is there. The server here is a second `node build`
// with its own data folder, so killing it leaves the journeys' server alone.

const freePort = () =>
	new Promise<number>((resolve, reject) => {
		const srv = net.createServer();
		srv.listen(0, '127.0.0.1', () => {
			const { port } = srv.address() as net.AddressInfo;
			srv.close(() => resolve(port));
		});
		srv.on('error', reject);
	});

async function startServer(port: number, dataDir: string) {
	const origin = `http://localhost:${port}`;
	const child = spawn(process.execPath, ['build'], {
		env: {
			...process.env,
			PORT: String(port),
			ORIGIN: origin,
			DATA_DIR: dataDir,
			AUTH_SECRET: 'crash-secret-crash-secret-crash-secret-0123',
			TIDEMARK_DEMO: '1',
			TIDEMARK_FAKES: '1',
			DEMO_PASSWORD: password,
			BODY_SIZE_LIMIT: '20M'
		},
		stdio: ['ignore', 'ignore', 'pipe']
	});
	let stderr = '';
	child.stderr!.on('data', (d) => (stderr += d));
	const deadline = Date.now() + 60_000;
	for (;;) {
		if (child.exitCode !== null) throw new Error(`server exited: ${stderr}`);
		try {
			if ((await fetch(`${origin}/api/health`)).ok) break;
		} catch {
			// not listening yet
		}
		if (Date.now() > deadline) throw new Error(`server did not start: ${stderr}`);
		await new Promise((r) => setTimeout(r, 200));
	}
	return { child, origin };
}

async function signedIn(origin: string): Promise<APIRequestContext> {
	const api = await request.newContext({ baseURL: origin, extraHTTPHeaders: { origin } });
	const res = await api.post('/auth/callback/credentials', {
		form: { email: accounts.tech, password, callbackUrl: '/' },
		maxRedirects: 0
	});
	expect(res.status()).toBe(302);
	expect(res.headers()['location']).not.toContain('error=');
	return api;
}

const png = Buffer.from(
	'iVBORw0KGgoAAAANSUhEUgAAAAgAAAAICAIAAABLbSncAAAAEklEQVR4nGP4z8CAFWEXHbQSACj/P8Fu7N9hAAAAAElFTkSuQmCC',
	'base64'
);

type Ack = { runId: string; seq: number; stepId: string };

test('kill -9 under load loses no acknowledged step event, reading or photo', async () => {
	test.setTimeout(180_000);
	const port = await freePort();
	const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-crash-'));
	let server: { child: ChildProcess; origin: string } | null = null;
	try {
		server = await startServer(port, dataDir);
		const api = await signedIn(server.origin);
		const CLIENTS = 16;
		const runs: string[] = [];
		for (let i = 0; i < CLIENTS; i++) {
			const job = await api.post('/api/jobs', {
				data: {
					customerName: 'Ines Larkspur',
					customerEmail: 'ines@example.test',
					maker: 'Corvana',
					model: 'Tern 5',
					imei: testImei('0071'),
					symptoms: ['restart-loop'],
					liquid: 'fresh',
					submerged: false,
					passcodeStatus: 'given',
					consentToOpen: true
				}
			});
			expect(job.status(), await job.text()).toBe(201);
			const run = await api.post('/api/runs', {
				data: { jobId: ((await job.json()) as { id: string }).id, flowId: 'restart-loop-after-liquid' }
			});
			expect(run.status(), await run.text()).toBe(201);
			runs.push(((await run.json()) as { id: string }).id);
		}

		const events: Ack[] = [];
		const photos: string[] = [];
		let stop = false;
		let sent = 0;
		// Even clients measure again and again (MEASURE, BACK, …); odd ones answer "dry longer" on a step
		// that loops to itself. Every fourth request is a photo of the current step.
		const client = async (i: number) => {
			const runId = runs[i];
			const walk: [string, number][] = [
				['power-on-as-received', 0],
				['open-and-disconnect', 1],
				['inspect-front-area', 0],
				i % 2 === 0 ? ['isolate-front-flex', 0] : ['isolate-front-flex', 1]
			];
			if (i % 2 === 1) walk.push(['isolate-other-modules', 1]);
			let n = 0;
			const send = async (data: Record<string, unknown>) => {
				const body = { ...data, idempotencyKey: `crash-${i}-${n++}` };
				sent++;
				try {
					const res = await api.post(`/api/runs/${runId}/events`, { data: body, timeout: 10_000 });
					if (res.status() === 200) {
						const r = (await res.json()) as { seq: number };
						events.push({ runId, seq: r.seq, stepId: data.stepId as string });
					}
					return res.status();
				} catch {
					return 0; // the server died mid-request: not acknowledged
				}
			};
			for (const [stepId, outcome] of walk) await send({ type: 'ANSWER', stepId, outcome });
			let step = i % 2 === 0 ? 'front-connector-diode' : 'clean-and-dry';
			while (!stop) {
				if (n % 4 === 3) {
					try {
						const res = await api.post(`/api/runs/${runId}/photos`, {
							multipart: {
								file: { name: `bench-${i}-${n}.png`, mimeType: 'image/png', buffer: png },
								stepId: step,
								caption: `client ${i} request ${n}`
							},
							timeout: 10_000
						});
						n++;
						if (res.status() === 201 || res.status() === 200)
							photos.push(((await res.json()) as { photo: { id: string } }).photo.id);
					} catch {
						n++;
					}
					continue;
				}
				if (i % 2 === 0) {
					if (step === 'front-connector-diode') {
						const s = await send({ type: 'MEASURE', stepId: step, value: 0.1 + (n % 20) / 10 });
						if (s === 200) step = 'try-known-good-flex';
					} else {
						const s = await send({ type: 'BACK', stepId: step });
						if (s === 200) step = 'front-connector-diode';
					}
				} else await send({ type: 'ANSWER', stepId: step, outcome: 1 });
			}
		};
		const load = Promise.all(runs.map((_, i) => client(i)));
		// Kill once the clients are well under way.
		const until = Date.now() + 20_000;
		while (events.length < 200 && Date.now() < until) await new Promise((r) => setTimeout(r, 50));
		server.child.kill('SIGKILL');
		await new Promise((r) => server!.child.once('exit', r));
		stop = true;
		await load;
		console.log(
			`crash: killed after ${events.length} acknowledged events and ${photos.length} photos (${sent} sent)`
		);
		expect(events.length).toBeGreaterThan(50);

		server = await startServer(port, dataDir);
		const again = await signedIn(server.origin);
		for (const runId of runs) {
			const res = await again.get(`/api/runs/${runId}`);
			expect(res.status()).toBe(200);
			const detail = (await res.json()) as { steps: { seq: number; stepId: string }[] };
			const stored = new Map(detail.steps.map((s) => [s.seq, s.stepId]));
			for (const ack of events.filter((e) => e.runId === runId))
				expect(stored.get(ack.seq), `run ${runId} step ${ack.seq}`).toBe(ack.stepId);
		}
		for (const id of photos) expect((await again.get(`/api/photos/${id}`)).status(), `photo ${id}`).toBe(200);
	} finally {
		if (server && server.child.exitCode === null) {
			server.child.kill('SIGTERM');
			await new Promise((r) => server!.child.once('exit', r));
		}
		fs.rmSync(dataDir, { recursive: true, force: true });
	}
});
