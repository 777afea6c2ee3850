// Issue 4 benchmark: guided runs against the built server.
// 1. Step-event round trip (POST /api/runs/:id/events) at 16 concurrent clients under autocannon:
//    p50/p95 (goal p95 <= 15 ms) and the ratio to a bare single-row insert into PGlite; beside it,
//    the floor that the HTTP stack sets for 16 flat-out connections (GET /api/health).
// 2. The longest event-loop stall in the server meanwhile (goal <= 50 ms), read from an env-gated,
//    lead-only endpoint that wraps perf_hooks.monitorEventLoopDelay inside the server process.
// 3. The JavaScript the run page ships, gzipped (goal <= 100 KB).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { randomUUID } from 'node:crypto';
import autocannon from 'autocannon';
import { PGlite } from '@electric-sql/pglite';
import { ensureBuild, freePort, median, startServer } from './lib.mjs';

const CLIENTS = 16;
// The paced window: each of the 16 clients sends an event every 250 ms (64 events/s in all), far
// more than a bench of technicians answering steps by hand, but below saturation, so the figure
// is the event's own latency rather than the queue that a flat-out closed loop builds.
const PACED_RATE = Number(process.env.BENCH_PACED_RATE ?? 64);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const PASSWORD = 'bench-demo-password';
const FLOW = 'restart-loop-after-liquid';

const pct = (xs, p) => {
	const s = [...xs].sort((a, b) => a - b);
	return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)];
};
const fmt = (ms) => `${ms.toFixed(2)} ms`;
/** Luhn check digit over 14 digits (3GPP TS 23.003 Annex B), for invented bench IMEIs. */
const imeiCheckDigit = (body14) => {
	let sum = 0;
	for (let i = 0; i < 14; i++) {
		let d = Number(body14[13 - i]);
		if (i % 2 === 0) d = d * 2 > 9 ? d * 2 - 9 : d * 2;
		sum += d;
	}
	return (10 - (sum % 10)) % 10;
};

ensureBuild();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-runs-bench-'));
const port = await freePort();
const base = `http://127.0.0.1:${port}`;
// SvelteKit's form CSRF check compares Origin with ORIGIN, which startServer sets to localhost.
const origin = `http://localhost:${port}`;
const server = await startServer({
	port,
	dataDir,
	env: { TIDEMARK_DEMO: '1', DEMO_PASSWORD: PASSWORD, TIDEMARK_DIAGNOSTICS: '1' }
});

try {
	const tech = await signIn('tech@tidemark.test');
	const lead = await signIn('lead@tidemark.test');
	const api = (cookie) => async (method, url, body) => {
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

	// One run per client, walked to "clean-and-dry", whose "dry longer" outcome loops back to itself.
	// Each client then alternates ANSWER (dry longer) and BACK, so the run's path stays short and
	// every request does the full work: lock, replay check, re-validation, step row, snapshot.
	const runIds = [];
	for (let i = 0; i < CLIENTS; i++) {
		const body14 = `0099${String(i).padStart(10, '0')}`;
		const job = await asTech('POST', '/api/jobs', {
			customerName: 'Bench Customer',
			customerEmail: 'bench@example.test',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: `${body14}${imeiCheckDigit(body14)}`,
			symptoms: ['restart-loop'],
			liquid: 'fresh',
			submerged: false,
			passcodeStatus: 'withheld',
			consentToOpen: true
		});
		const run = await asTech('POST', '/api/runs', { jobId: job.id, flowId: FLOW });
		const walk = [
			['power-on-as-received', 0],
			['open-and-disconnect', 1],
			['inspect-front-area', 0],
			['isolate-front-flex', 1],
			['isolate-other-modules', 1]
		];
		for (const [stepId, outcome] of walk)
			await asTech('POST', `/api/runs/${run.id}/events`, {
				type: 'ANSWER',
				stepId,
				outcome,
				idempotencyKey: randomUUID()
			});
		runIds.push(run.id);
	}

	// Warm-up (JIT, compiled-machine cache), then the measured window.
	await load(2);
	await asLead('POST', '/api/diagnostics/event-loop');
	const { result, times } = await load(SECONDS);
	const loop = await asLead('GET', '/api/diagnostics/event-loop');

	await asLead('POST', '/api/diagnostics/event-loop');
	const paced = await pacedLoad(SECONDS, PACED_RATE);
	const pacedLoop = await asLead('GET', '/api/diagnostics/event-loop');

	// The floor under the flat-out figure: the same 16 connections on the cheapest route that touches
	// the database (GET /api/health: the hooks, one `select 1`, a small JSON answer), same server.
	const floor = await floorLoad(SECONDS);

	const p50 = pct(times, 50);
	const p95 = pct(times, 95);
	const insert = await bareInsert();
	console.log(
		`step events: ${times.length} in ${SECONDS} s at ${CLIENTS} clients (${Math.round(result.requests.average)} req/s), ` +
			`non-2xx ${result.non2xx}, errors ${result.errors}`
	);
	console.log(
		`step-event round trip, flat out: p50 ${fmt(p50)}, p95 ${fmt(p95)}, p99 ${fmt(pct(times, 99))} (goal p95 <= 15 ms) ${p95 <= 15 ? 'OK' : 'OVER GOAL'}`
	);
	const paced95 = pct(paced.times, 95);
	console.log(
		`step-event round trip, paced at ${PACED_RATE} events/s over ${CLIENTS} clients: p50 ${fmt(pct(paced.times, 50))}, ` +
			`p95 ${fmt(paced95)}, p99 ${fmt(pct(paced.times, 99))} (${paced.times.length} events; goal p95 <= 15 ms) ${paced95 <= 15 ? 'OK' : 'OVER GOAL'}`
	);
	console.log(
		`  flat out, each of ${CLIENTS} clients waits behind the others: p50 is about ${CLIENTS} x the server time per event ` +
			`(${(1000 / result.requests.average).toFixed(2)} ms at ${Math.round(result.requests.average)} req/s).`
	);
	console.log(
		`  floor, GET /api/health (one select 1) flat out at ${CLIENTS} connections, same server and database: p50 ${fmt(pct(floor.times, 50))}, ` +
			`p95 ${fmt(pct(floor.times, 95))} (${Math.round(floor.result.requests.average)} req/s); ` +
			`flat-out event p95 / floor p95 = ${(p95 / pct(floor.times, 95)).toFixed(1)}x`
	);
	console.log(
		`bare single-row insert (PGlite on disk, in the bench process): median ${fmt(insert.median)}, p95 ${fmt(insert.p95)}; ` +
			`event p50 / insert median = ${(p50 / insert.median).toFixed(1)}x`
	);
	const stall = (name, l) =>
		console.log(
			`server event loop, ${name}: longest stall ${fmt(l.maxMs)}, p99 ${fmt(l.p99Ms)}, mean ${fmt(l.meanMs)} ` +
				`(goal <= 50 ms) ${l.maxMs <= 50 ? 'OK' : 'OVER GOAL'}`
		);
	// Flat out, one turn of the loop serves every request that arrived meanwhile (16 x the time per
	// event), so the "stall" there is the queue; paced, it is the longest single piece of work.
	stall('flat out', loop);
	stall('paced', pacedLoop);

	const js = await pageJavaScript(`/runs/${runIds[0]}`, tech);
	console.log(
		`run page JavaScript (nodes ${js.nodes.join(', ')}): ${js.files} files, ${(js.raw / 1024).toFixed(1)} KB raw, ${(js.gzip / 1024).toFixed(1)} KB gzipped ` +
			`(goal <= 100 KB) ${js.gzip <= 100 * 1024 ? 'OK' : 'OVER GOAL'}`
	);

	/**
	 * Each client sends one event every CLIENTS / rate seconds, starting at a random phase, so the
	 * events arrive spread out as from technicians at their benches (autocannon's own rate limit
	 * releases a whole second's requests at once, which measures a burst instead).
	 */
	async function pacedLoad(seconds, rate) {
		const period = (CLIENTS / rate) * 1000;
		const end = performance.now() + seconds * 1000;
		const times = [];
		const client = async (runId) => {
			let back = false;
			let next = performance.now() + Math.random() * period;
			while (next < end) {
				await new Promise((r) => setTimeout(r, Math.max(0, next - performance.now())));
				const body = {
					type: back ? 'BACK' : 'ANSWER',
					stepId: 'clean-and-dry',
					idempotencyKey: randomUUID()
				};
				if (!back) body.outcome = 1;
				const t0 = performance.now();
				await asTech('POST', `/api/runs/${runId}/events`, body);
				times.push(performance.now() - t0);
				back = !back;
				next += period;
			}
		};
		await Promise.all(runIds.map(client));
		return { times };
	}

	/** GET /api/health under the same load as the events, with the same session cookie. */
	async function floorLoad(seconds) {
		const times = [];
		const instance = autocannon({
			url: `${base}/api/health`,
			connections: CLIENTS,
			duration: seconds,
			headers: { cookie: tech }
		});
		instance.on('response', (_client, _status, _bytes, ms) => times.push(ms));
		const result = await instance;
		return { result, times };
	}

	/** Runs autocannon for `seconds`; every response time is kept for exact percentiles. */
	async function load(seconds) {
		let next = 0;
		const times = [];
		const event = (type) => ({
			method: 'POST',
			setupRequest: (req, context) => {
				context.run ??= runIds[next++ % runIds.length];
				const body = { type, stepId: 'clean-and-dry', idempotencyKey: randomUUID() };
				if (type === 'ANSWER') body.outcome = 1;
				return { ...req, path: `/api/runs/${context.run}/events`, body: JSON.stringify(body) };
			}
		});
		const instance = autocannon({
			url: base,
			connections: CLIENTS,
			duration: seconds,
			headers: { cookie: tech, 'content-type': 'application/json', origin },
			requests: [event('ANSWER'), event('BACK')]
		});
		instance.on('response', (_client, _status, _bytes, ms) => times.push(ms));
		const result = await instance;
		return { result, times };
	}
} finally {
	await server.stop();
	fs.rmSync(dataDir, { recursive: true, force: true });
}

/** Signs in through the app's own form and returns the session cookie header. */
async function signIn(email) {
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

/** The baseline: one-row inserts with a similar payload into a PGlite on disk, timed one by one. */
async function bareInsert() {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-insert-bench-'));
	const db = await PGlite.create(path.join(dir, 'pgdata'));
	try {
		await db.exec(
			'create table t (id bigserial primary key, run_id uuid not null, seq int not null, answer jsonb not null, at timestamptz not null default now())'
		);
		const run = randomUUID();
		const times = [];
		for (let i = 0; i < 3000; i++) {
			const t0 = performance.now();
			await db.query('insert into t (run_id, seq, answer) values ($1, $2, $3)', [
				run,
				i,
				JSON.stringify({ outcome: { index: 1, label: 'Restarts less often; dry longer and test again' } })
			]);
			if (i >= 500) times.push(performance.now() - t0);
		}
		return { median: median(times), p95: pct(times, 95) };
	} finally {
		await db.close();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

/**
 * The JavaScript a browser loads for the page: SvelteKit's HTML imports start.js and app.js and
 * names the route's nodes (`node_ids`); app.js maps each node to its file. Every module reachable
 * from those by static imports is counted once (lazy `import()` chunks are not loaded up front).
 */
async function pageJavaScript(url, cookie) {
	const pageUrl = base + url;
	const html = await (await fetch(pageUrl, { headers: { cookie } })).text();
	const entries = [...html.matchAll(/import\("([^"]+\.js)"\)/g)].map((m) => new URL(m[1], pageUrl).href);
	const nodeIds = JSON.parse(/node_ids:\s*(\[[^\]]*\])/.exec(html)?.[1] ?? '[]');
	const text = new Map();
	const get = async (href) => {
		if (!text.has(href)) text.set(href, Buffer.from(await (await fetch(href)).arrayBuffer()));
		return text.get(href);
	};
	const app = entries.find((e) => /\/entry\/app\./.test(e));
	const appText = app ? (await get(app)).toString() : '';
	const nodeFiles = [...appText.matchAll(/import\("(\.\.\/nodes\/(\d+)\.[^"]+\.js)"\)/g)]
		.filter((m) => nodeIds.includes(Number(m[2])))
		.map((m) => new URL(m[1], app).href);
	const queue = [...entries, ...nodeFiles];
	const seen = new Set();
	while (queue.length) {
		const href = queue.pop();
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
