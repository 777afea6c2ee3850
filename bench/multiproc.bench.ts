// Step events from 32 clients on a PostgreSQL server: one `node build` process against two
// processes sharing the database (16 clients each), in the same run on the same machine (issue 16).
// Needs DATABASE_URL naming a server (each measurement gets a fresh database on it); skipped without.
// Each client walks its own run to the restart-loop flow's loop step, then alternates "dry longer"
// and BACK flat out (autocannon), as in bench/runs.bench.ts.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import autocannon from 'autocannon';
import { ensureBuild, freePort, startServer } from './lib.mjs';
import { benchIntake, cpuMs, freshDatabase, pct } from './server-figures';
import { dryLonger, loopStep, restartLoopFlow, toCleanAndDry } from '../src/lib/server/runs/walks';

const CLIENTS = 32;
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const PASSWORD = 'bench-demo-password';
const ADMIN_URL = process.env.DATABASE_URL;

type Figures = { processes: number; rate: number; p50: number; p95: number; non2xx: number; cpuMs: number };

if (!ADMIN_URL) {
	console.log('DATABASE_URL not set: the two-process run needs a PostgreSQL server (see .ci/run). Skipped.');
	process.exit(0);
}
ensureBuild();
const results: Figures[] = [];
for (const processes of [1, 2]) results.push(await measure(processes));

console.log(`\nSummary (${CLIENTS} clients flat out, ${SECONDS} s, PostgreSQL; ${os.cpus().length} cores)`);
console.log('| processes | events/s | p50 / p95 | non-2xx | Node CPU per event (all processes) |');
console.log('|---|---|---|---|---|');
for (const r of results)
	console.log(
		`| ${r.processes} | ${Math.round(r.rate)} | ${r.p50.toFixed(1)} / ${r.p95.toFixed(1)} ms | ${r.non2xx} | ${r.cpuMs.toFixed(2)} ms |`
	);

async function measure(processes: number): Promise<Figures> {
	const database = await freshDatabase(ADMIN_URL!);
	const servers: Awaited<ReturnType<typeof startServer>>[] = [];
	const ports: number[] = [];
	const dirs: string[] = [];
	try {
		// One at a time: the first migrates and seeds the demo shop, the next finds it done.
		for (let i = 0; i < processes; i++) {
			const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-multiproc-bench-'));
			dirs.push(dataDir);
			ports.push(await freePort());
			servers.push(
				await startServer({
					port: ports[i],
					dataDir,
					env: {
						TIDEMARK_DEMO: '1',
						TIDEMARK_DEMO_HISTORY: '0',
						DEMO_PASSWORD: PASSWORD,
						DATABASE_URL: database.url,
						// One secret for all, so a session cookie works on every process.
						AUTH_SECRET: 'bench-multiproc-secret-bench-multiproc-0123'
					}
				})
			);
		}
		const cookie = await signIn(ports[0]);
		const runIds: string[] = [];
		for (let i = 0; i < CLIENTS; i++) runIds.push(await runAtLoopStep(ports[i % ports.length], cookie, i));

		// Client i sends to process i % processes, always for its own run.
		const flat = (seconds: number) =>
			Promise.all(
				ports.map((port, p) => {
					const mine = runIds.filter((_, i) => i % ports.length === p);
					return flatOut(port, cookie, mine, seconds);
				})
			);
		await flat(2); // warm-up
		const cpu0 = servers.map((s) => cpuMs(s.child.pid!));
		const parts = await flat(SECONDS);
		const cpu = servers.reduce((sum, s, i) => sum + cpuMs(s.child.pid!) - cpu0[i], 0);
		const times = parts.flatMap((p) => p.times);
		const r = {
			processes,
			rate: times.length / SECONDS,
			p50: pct(times, 50),
			p95: pct(times, 95),
			non2xx: parts.reduce((n, p) => n + p.non2xx, 0),
			cpuMs: cpu / times.length
		};
		console.log(
			`${processes} process(es), ${CLIENTS} clients: ${times.length} events in ${SECONDS} s (${Math.round(r.rate)}/s), ` +
				`p50 ${r.p50.toFixed(1)} ms, p95 ${r.p95.toFixed(1)} ms, non-2xx ${r.non2xx}`
		);
		return r;
	} finally {
		await Promise.all(servers.map((s) => s.stop()));
		for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
		await database.drop();
	}
}

async function flatOut(port: number, cookie: string, runIds: string[], seconds: number) {
	let next = 0;
	const times: number[] = [];
	const origin = `http://localhost:${port}`;
	const event = (back: boolean) => ({
		method: 'POST' as const,
		setupRequest: (req: Record<string, unknown>, context: { run?: string }) => {
			context.run ??= runIds[next++ % runIds.length];
			const body = back
				? { type: 'BACK', stepId: loopStep, idempotencyKey: randomUUID() }
				: { type: 'ANSWER', stepId: loopStep, outcome: dryLonger, idempotencyKey: randomUUID() };
			return { ...req, path: `/api/runs/${context.run}/events`, body: JSON.stringify(body) };
		}
	});
	const instance = autocannon({
		url: `http://127.0.0.1:${port}`,
		connections: runIds.length,
		duration: seconds,
		headers: { cookie, 'content-type': 'application/json', origin },
		requests: [event(false), event(true)]
	});
	instance.on('response', (_c: unknown, _s: number, _b: number, ms: number) => times.push(ms));
	const result = await instance;
	return { times, non2xx: result.non2xx + result.errors };
}

async function api(port: number, cookie: string, method: string, url: string, body?: unknown) {
	const res = await fetch(`http://127.0.0.1:${port}${url}`, {
		method,
		headers: { cookie, 'content-type': 'application/json', origin: `http://localhost:${port}` },
		body: body === undefined ? undefined : JSON.stringify(body)
	});
	const text = await res.text();
	if (!res.ok) throw new Error(`${method} ${url}: ${res.status} ${text}`);
	return text ? JSON.parse(text) : undefined;
}

/** A job and a run of the restart-loop flow, walked to its loop step. */
async function runAtLoopStep(port: number, cookie: string, i: number) {
	const job = await api(port, cookie, 'POST', '/api/jobs', benchIntake('0098', i));
	const run = await api(port, cookie, 'POST', '/api/runs', { jobId: job.id, flowId: restartLoopFlow });
	for (const [stepId, outcome] of toCleanAndDry)
		await api(port, cookie, 'POST', `/api/runs/${run.id}/events`, {
			type: 'ANSWER',
			stepId,
			outcome,
			idempotencyKey: randomUUID()
		});
	return run.id as string;
}

async function signIn(port: number) {
	const res = await fetch(`http://127.0.0.1:${port}/signin`, {
		method: 'POST',
		redirect: 'manual',
		headers: { 'content-type': 'application/x-www-form-urlencoded', origin: `http://localhost:${port}` },
		body: new URLSearchParams({ email: 'tech@tidemark.test', password: PASSWORD })
	});
	const cookies = res.headers.getSetCookie().map((c) => c.split(';')[0]);
	if (!cookies.some((c) => c.includes('session-token'))) throw new Error(`sign-in failed: ${res.status}`);
	return cookies.join('; ');
}
