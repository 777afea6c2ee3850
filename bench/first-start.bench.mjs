// Issue 17: the demo's first start on an empty data folder. Time from process start to the first
// 200 of /api/health (initdb, migrate, seed the shop and its day), then to a complete year of
// invented history written in the background, and how the server answers meanwhile (p50/p95/max of
// /api/health sampled every 100 ms while the history fills). One run: a first start happens once.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureBuild, freePort, median } from './lib.mjs';

ensureBuild();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-first-start-'));
const port = await freePort();
const t0 = performance.now();
const child = spawn(process.execPath, ['build'], {
	env: {
		...process.env,
		PORT: String(port),
		ORIGIN: `http://localhost:${port}`,
		DATA_DIR: dataDir,
		AUTH_SECRET: 'bench-secret-bench-secret-bench-secret-0123',
		TIDEMARK_DEMO: '1',
		TIDEMARK_DEMO_HISTORY: ''
	},
	stdio: ['ignore', 'pipe', 'inherit']
});
let complete = null;
let out = '';
child.stdout.on('data', (chunk) => {
	out += chunk;
	if (complete === null && /\[demo\] history complete/.test(out)) complete = performance.now() - t0;
});

let firstOk = null;
const latencies = [];
while (complete === null) {
	if (child.exitCode !== null) throw new Error(`server exited with ${child.exitCode}:\n${out}`);
	if (performance.now() - t0 > 600_000) throw new Error(`no complete history after 10 min:\n${out}`);
	const s = performance.now();
	try {
		const res = await fetch(`http://127.0.0.1:${port}/api/health`);
		if (res.status === 200) {
			if (firstOk === null) firstOk = performance.now() - t0;
			else latencies.push(performance.now() - s);
		}
	} catch {
		// not listening yet
	}
	await new Promise((r) => setTimeout(r, firstOk === null ? 10 : 100));
}
// Let the insights' catch-up after the history finish before stopping.
await new Promise((r) => setTimeout(r, 3000));
await new Promise((resolve) => {
	child.once('exit', resolve);
	child.kill('SIGTERM');
});
fs.rmSync(dataDir, { recursive: true, force: true });

const sorted = [...latencies].sort((a, b) => a - b);
const p95 = sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * 0.95))] ?? 0;
const runs = /history complete: (\d+) runs in ([\d.]+) s/.exec(out);
console.log(`first 200 of /api/health on an empty folder: ${(firstOk / 1000).toFixed(1)} s`);
console.log(
	`complete history (${runs?.[1] ?? '?'} runs, written in ${runs?.[2] ?? '?'} s): ${(complete / 1000).toFixed(1)} s after start`
);
console.log(
	`/api/health while it fills (${latencies.length} samples): p50 ${median(latencies).toFixed(0)} ms, p95 ${p95.toFixed(0)} ms, max ${(sorted.at(-1) ?? 0).toFixed(0)} ms`
);
