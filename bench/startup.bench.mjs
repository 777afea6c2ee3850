// Issue: time from process start to the first 200 of /api/health with an existing data folder.
// Goal ≤ 2.5 s on the 2-core machine. Median of 5 runs.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureBuild, freePort, median, startServer } from './lib.mjs';

ensureBuild();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-bench-'));
const port = await freePort();
// First start creates the data folder (initdb), migrates and seeds the demo: not measured.
const first = await startServer({ port, dataDir, env: { TIDEMARK_DEMO: '1', TIDEMARK_DEMO_HISTORY: '0' } });
await first.stop();
console.log(
	`first start on an empty folder (initdb + migrate + seed): ${(first.ms / 1000).toFixed(2)} s (not part of the goal)`
);

const runs = [];
for (let i = 0; i < 5; i++) {
	const server = await startServer({ port, dataDir });
	runs.push(server.ms);
	await server.stop();
}
fs.rmSync(dataDir, { recursive: true, force: true });
const m = median(runs) / 1000;
console.log(`runs: ${runs.map((r) => (r / 1000).toFixed(2)).join(', ')} s`);
console.log(
	`startup to first 200 of /api/health, existing data folder: median ${m.toFixed(2)} s (goal <= 2.5 s) ${m <= 2.5 ? 'OK' : 'OVER GOAL'}`
);
