#!/usr/bin/env node
// `npm run bench`: runs every bench/*.bench.{mjs,ts} in name order and prints each one's report.
// Benchmarks measure; they never fail the build. Figures are medians (or percentiles where stated).
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

const only = process.argv.slice(2);
const files = fs
	.readdirSync('bench')
	.filter((f) => /\.bench\.(mjs|ts)$/.test(f))
	.filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
	.sort();
let failed = 0;
for (const file of files) {
	console.log(`\n=== ${file} ===`);
	const runner = file.endsWith('.ts')
		? ['npx', ['tsx', path.join('bench', file)]]
		: [process.execPath, [path.join('bench', file)]];
	const result = spawnSync(runner[0], runner[1], { stdio: 'inherit' });
	if (result.status !== 0) failed++;
}
if (failed) {
	console.error(`\n${failed} benchmark(s) did not finish.`);
	process.exit(1);
}
