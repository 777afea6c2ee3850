// Step events against the built server (issue 12, point 1). For each database (PGlite always,
// PostgreSQL when DATABASE_URL names a server: each measurement gets a fresh database on it) and
// each build (BENCH_BUILDS, comma-separated build folders, default `build`; e.g.
// BENCH_BUILDS=.build-before,build compares two versions in one run):
// 1. Capacity: 16 clients flat out under autocannon (each sends its next event the moment the last
//    is answered): events/s (goal >= 400), p50/p95, and the floor of the cheapest database route.
// 2. Paced: 64 technicians each sending one event a second, at a random moment within each second:
//    p50/p95 (goal p95 <= 10 ms), and the same clients at the same pace on GET /api/health, what
//    the machine and the load generator alone take (the paced floor).
// 3. The longest event-loop stall in each window (goal <= 50 ms), read from an env-gated, lead-only
//    endpoint that wraps perf_hooks.monitorEventLoopDelay inside the server process.
// 4. The JavaScript the run page ships, gzipped (goal <= 100 KB).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { randomUUID } from 'node:crypto';
import autocannon from 'autocannon';
import { ensureBuild, freePort, startServer } from './lib.mjs';
import { benchIntake, cpuMs, freshDatabase, pct } from './server-figures';
import { dryLonger, loopStep, restartLoopFlow, toCleanAndDry } from '../src/lib/server/runs/walks';

const FLAT_CLIENTS = 16;
const PACED_CLIENTS = Number(process.env.BENCH_PACED_CLIENTS ?? 64);
/** Seconds between two events of one paced client: a technician answering steps by hand is slower. */
const PACED_PERIOD = Number(process.env.BENCH_PACED_PERIOD ?? 1);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const PASSWORD = 'bench-demo-password';
const BUILDS = (process.env.BENCH_BUILDS ?? 'build').split(',').filter(Boolean);
const ADMIN_URL = process.env.DATABASE_URL;

type Loop = { maxMs: number; p99Ms: number; meanMs: number };
type Window = { rate: number; times: number[]; loop: Loop; non2xx: number; cpuMs: number };
type Figures = {
	build: string;
	db: string;
	flat: Window;
	paced: Window;
	pacedFloor: Window;
	floor: Window;
	js?: number;
};

const fmt = (ms: number) => `${ms.toFixed(2)} ms`;

if (BUILDS.includes('build')) ensureBuild();
const all: Figures[] = [];
const dbs = ADMIN_URL ? ['pglite', 'postgres'] : ['pglite'];
if (!ADMIN_URL)
	console.log('PostgreSQL: DATABASE_URL not set, skipped (see .ci/run for a throw-away server).');
for (const db of dbs)
	for (const build of BUILDS) {
		console.log(`\n--- ${build} on ${db} ---`);
		all.push(await measure(build, db));
	}

console.log(
	'\nSummary (flat out: 16 clients; paced: %d clients, one event every %d s each)',
	PACED_CLIENTS,
	PACED_PERIOD
);
console.log(
	'| build | database | flat events/s | flat p50 / p95 | flat stall | server CPU per event | paced p50 / p95 | paced stall | paced floor p95 | floor p95 | run page JS (gzip) |'
);
console.log('|---|---|---|---|---|---|---|---|---|---|---|');
for (const f of all)
	console.log(
		`| ${f.build} | ${f.db} | ${Math.round(f.flat.rate)} | ${f.flat.times.length ? `${pct(f.flat.times, 50).toFixed(1)} / ${pct(f.flat.times, 95).toFixed(1)} ms` : '-'} | ` +
			`${f.flat.loop.maxMs.toFixed(0)} ms | ${(f.flat.cpuMs / f.flat.times.length).toFixed(2)} ms | ${pct(f.paced.times, 50).toFixed(1)} / ${pct(f.paced.times, 95).toFixed(1)} ms | ` +
			`${f.paced.loop.maxMs.toFixed(0)} ms | ${pct(f.pacedFloor.times, 95).toFixed(1)} ms | ${pct(f.floor.times, 95).toFixed(1)} ms | ${f.js ? `${(f.js / 1024).toFixed(1)} KB` : ''} |`
	);

async function measure(build: string, db: string): Promise<Figures> {
	const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-runs-bench-'));
	const port = await freePort();
	const base = `http://127.0.0.1:${port}`;
	// SvelteKit's form CSRF check compares Origin with ORIGIN, which startServer sets to localhost.
	const origin = `http://localhost:${port}`;
	const database = db === 'postgres' ? await freshDatabase(ADMIN_URL!) : undefined;
	const server = await startServer({
		port,
		dataDir,
		build,
		env: {
			TIDEMARK_DEMO: '1',
			// The demo's year of history fills in the background on a first start: not while measuring.
			TIDEMARK_DEMO_HISTORY: '0',
			DEMO_PASSWORD: PASSWORD,
			TIDEMARK_DIAGNOSTICS: '1',
			DATABASE_URL: database?.url ?? ''
		}
	});
	try {
		const tech = await signIn(base, origin, 'tech@tidemark.test');
		const lead = await signIn(base, origin, 'lead@tidemark.test');
		const api = (cookie: string) => async (method: string, url: string, body?: unknown) => {
			const res = await fetch(base + url, {
				method,
				headers: { cookie, 'content-type': 'application/json', origin },
				body: body === undefined ? undefined : JSON.stringify(body)
			});
			const text = await res.text();
			if (!res.ok) throw new Error(`${method} ${url}: ${res.status} ${text}`);
			return text ? JSON.parse(text) : undefined;
		};
		const asTech = api(tech);
		const asLead = api(lead);
		const stepEvent = (back: boolean) =>
			back
				? { type: 'BACK', stepId: loopStep, idempotencyKey: randomUUID() }
				: { type: 'ANSWER', stepId: loopStep, outcome: dryLonger, idempotencyKey: randomUUID() };

		// One run per client, walked to the loop step; each client then alternates ANSWER (dry longer)
		// and BACK, so the run's path stays short and every request does the full work.
		const runIds: string[] = [];
		for (let i = 0; i < Math.max(PACED_CLIENTS, FLAT_CLIENTS); i++) {
			const job = await asTech('POST', '/api/jobs', benchIntake('0099', i));
			const run = await asTech('POST', '/api/runs', { jobId: job.id, flowId: restartLoopFlow });
			for (const [stepId, outcome] of toCleanAndDry)
				await asTech('POST', `/api/runs/${run.id}/events`, {
					type: 'ANSWER',
					stepId,
					outcome,
					idempotencyKey: randomUUID()
				});
			runIds.push(run.id);
		}

		const windowed = async (work: () => Promise<{ rate: number; times: number[]; non2xx: number }>) => {
			await asLead('POST', '/api/diagnostics/event-loop');
			const cpu0 = cpuMs(server.child.pid!);
			const r = await work();
			const cpu = cpuMs(server.child.pid!) - cpu0;
			return { ...r, cpuMs: cpu, loop: (await asLead('GET', '/api/diagnostics/event-loop')) as Loop };
		};
		/** The server's CPU time per request of a window: on a shared machine, steadier than its wall time. */
		const perEvent = (w: Window) => w.cpuMs / w.times.length;
		// Warm-up (JIT, compiled-machine cache), then the measured windows.
		await flatOut(2);
		const flat = await windowed(() => flatOut(SECONDS));
		const paced = await windowed(() => pacedLoad(SECONDS, true));
		// The floor under the paced figure: the same clients at the same pace on GET /api/health, so
		// what the machine, the network stack and the load generator add to every answer is visible.
		const pacedFloor = await windowed(() => pacedLoad(SECONDS, false));
		// The floor under the flat-out figure: the same 16 connections on the cheapest route that
		// touches the database (GET /api/health: the hooks, one `select 1`, a small JSON answer).
		const floor = await windowed(() => floorLoad(SECONDS));

		console.log(
			`flat out, ${FLAT_CLIENTS} clients: ${flat.times.length} events in ${SECONDS} s (${Math.round(flat.rate)}/s; goal >= 400), non-2xx ${flat.non2xx}; ` +
				`p50 ${fmt(pct(flat.times, 50))}, p95 ${fmt(pct(flat.times, 95))}, p99 ${fmt(pct(flat.times, 99))}; ` +
				`longest stall ${fmt(flat.loop.maxMs)} ${flat.rate >= 400 ? 'OK' : 'UNDER GOAL'}`
		);
		console.log(
			`  server CPU per event (Node process): ${fmt(perEvent(flat))}, so one free core serves about ${Math.round(1000 / perEvent(flat))} events/s`
		);
		const p95 = pct(paced.times, 95);
		console.log(
			`paced, ${PACED_CLIENTS} clients x 1 event / ${PACED_PERIOD} s: ${paced.times.length} events, non-2xx ${paced.non2xx}; ` +
				`p50 ${fmt(pct(paced.times, 50))}, p95 ${fmt(p95)}, p99 ${fmt(pct(paced.times, 99))} (goal p95 <= 10 ms) ${p95 <= 10 ? 'OK' : 'OVER GOAL'}; ` +
				`longest stall ${fmt(paced.loop.maxMs)} (goal <= 50 ms) ${paced.loop.maxMs <= 50 ? 'OK' : 'OVER GOAL'}`
		);
		console.log(
			`paced floor, GET /api/health at the same pace: p50 ${fmt(pct(pacedFloor.times, 50))}, p95 ${fmt(pct(pacedFloor.times, 95))}`
		);
		console.log(
			`floor, GET /api/health flat out at ${FLAT_CLIENTS} connections: p50 ${fmt(pct(floor.times, 50))}, p95 ${fmt(pct(floor.times, 95))} (${Math.round(floor.rate)}/s)`
		);
		let js: number | undefined;
		if (db === 'pglite') {
			const page = await pageJavaScript(base, `/runs/${runIds[0]}`, tech);
			js = page.gzip;
			console.log(
				`run page JavaScript (nodes ${page.nodes.join(', ')}): ${page.files} files, ${(page.raw / 1024).toFixed(1)} KB raw, ` +
					`${(page.gzip / 1024).toFixed(1)} KB gzipped (goal <= 100 KB) ${page.gzip <= 100 * 1024 ? 'OK' : 'OVER GOAL'}`
			);
		}
		return { build, db, flat, paced, pacedFloor, floor, js };

		/**
		 * Each client sends one event (or, for the floor, GET /api/health) in every PACED_PERIOD
		 * seconds, at a random moment within it.
		 */
		async function pacedLoad(seconds: number, events: boolean) {
			const period = PACED_PERIOD * 1000;
			const start = performance.now();
			const end = start + seconds * 1000;
			const times: number[] = [];
			let non2xx = 0;
			const client = async (runId: string) => {
				let back = false;
				// One event in every period, at a moment drawn afresh each period: with one phase kept for the
				// whole window, the same few clients that happened to collide would collide every period,
				// and the p95 would measure that one draw rather than the server.
				let slot = 0;
				let next = start + Math.random() * period;
				while (next < end) {
					await new Promise((r) => setTimeout(r, Math.max(0, next - performance.now())));
					const t0 = performance.now();
					const res = events
						? await fetch(`${base}/api/runs/${runId}/events`, {
								method: 'POST',
								headers: { cookie: tech, 'content-type': 'application/json', origin },
								body: JSON.stringify(stepEvent(back))
							})
						: await fetch(`${base}/api/health`, { headers: { cookie: tech } });
					await res.arrayBuffer();
					times.push(performance.now() - t0);
					if (!res.ok) non2xx++;
					back = !back;
					next = start + ++slot * period + Math.random() * period;
				}
			};
			await Promise.all(runIds.slice(0, PACED_CLIENTS).map(client));
			return { rate: times.length / seconds, times, non2xx };
		}

		/** Runs autocannon for `seconds`; every response time is kept for exact percentiles. */
		async function flatOut(seconds: number) {
			let next = 0;
			const times: number[] = [];
			const event = (back: boolean) => ({
				method: 'POST' as const,
				setupRequest: (req: Record<string, unknown>, context: { run?: string }) => {
					context.run ??= runIds[next++ % FLAT_CLIENTS];
					return { ...req, path: `/api/runs/${context.run}/events`, body: JSON.stringify(stepEvent(back)) };
				}
			});
			const instance = autocannon({
				url: base,
				connections: FLAT_CLIENTS,
				duration: seconds,
				headers: { cookie: tech, 'content-type': 'application/json', origin },
				requests: [event(false), event(true)]
			});
			instance.on('response', (_c: unknown, _s: number, _b: number, ms: number) => times.push(ms));
			const result = await instance;
			return { rate: times.length / seconds, times, non2xx: result.non2xx + result.errors };
		}

		/** GET /api/health under the same load as the events, with the same session cookie. */
		async function floorLoad(seconds: number) {
			const times: number[] = [];
			const instance = autocannon({
				url: `${base}/api/health`,
				connections: FLAT_CLIENTS,
				duration: seconds,
				headers: { cookie: tech }
			});
			instance.on('response', (_c: unknown, _s: number, _b: number, ms: number) => times.push(ms));
			const result = await instance;
			return { rate: times.length / seconds, times, non2xx: result.non2xx + result.errors };
		}
	} finally {
		await server.stop();
		fs.rmSync(dataDir, { recursive: true, force: true });
		await database?.drop();
	}
}

/** Signs in through the app's own form and returns the session cookie header. */
async function signIn(base: string, origin: string, email: string) {
	const res = await fetch(`${base}/signin`, {
		method: 'POST',
		redirect: 'manual',
		headers: { 'content-type': 'application/x-www-form-urlencoded', origin },
		body: new URLSearchParams({ email, password: PASSWORD })
	});
	const cookies = res.headers.getSetCookie().map((c) => c.split(';')[0]);
	if (!cookies.some((c) => c.includes('session-token')))
		throw new Error(`sign-in failed for ${email}: ${res.status}`);
	return cookies.join('; ');
}

/**
 * The JavaScript a browser loads for the page: SvelteKit's HTML imports start.js and app.js and
 * names the route's nodes (`node_ids`); app.js maps each node to its file. Every module reachable
 * from those by static imports is counted once (lazy `import()` chunks are not loaded up front).
 */
async function pageJavaScript(base: string, url: string, cookie: string) {
	const pageUrl = base + url;
	const html = await (await fetch(pageUrl, { headers: { cookie } })).text();
	const entries = [...html.matchAll(/import\("([^"]+\.js)"\)/g)].map((m) => new URL(m[1], pageUrl).href);
	const nodeIds = JSON.parse(/node_ids:\s*(\[[^\]]*\])/.exec(html)?.[1] ?? '[]');
	const text = new Map<string, Buffer>();
	const get = async (href: string): Promise<Buffer> => {
		if (!text.has(href)) text.set(href, Buffer.from(await (await fetch(href)).arrayBuffer()));
		return text.get(href)!;
	};
	const app = entries.find((e) => /\/entry\/app\./.test(e));
	const appText = app ? (await get(app)).toString() : '';
	const nodeFiles = [...appText.matchAll(/import\("(\.\.\/nodes\/(\d+)\.[^"]+\.js)"\)/g)]
		.filter((m) => nodeIds.includes(Number(m[2])))
		.map((m) => new URL(m[1], app).href);
	const queue = [...entries, ...nodeFiles];
	const seen = new Set<string>();
	while (queue.length) {
		const href = queue.pop()!;
		if (seen.has(href)) continue;
		seen.add(href);
		const src = (await get(href)).toString();
		// Static imports only: `import{a}from"./x.js"`, `import"./x.js"`, `export*from"./x.js"`.
		for (const m of src.matchAll(/(?:\bfrom|\bimport)\s*"(\.{1,2}\/[^"]+\.js)"/g))
			queue.push(new URL(m[1], href).href);
	}
	let raw = 0;
	let gzip = 0;
	for (const href of seen) {
		const bytes = await get(href);
		raw += bytes.length;
		gzip += zlib.gzipSync(bytes, { level: 9 }).length;
	}
	return { files: seen.size, raw, gzip, nodes: nodeIds };
}
