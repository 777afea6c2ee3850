#!/usr/bin/env node
// `npm run test:e2e`: builds the app, then runs the Playwright journeys in tests/e2e against
// `node build` on a free port with a fresh temporary data folder (see playwright.config.ts).
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { ensureChromium } from './chromium.mjs';

const freePort = () =>
	new Promise((resolve, reject) => {
		const srv = net.createServer();
		srv.listen(0, '127.0.0.1', () => {
			const { port } = srv.address();
			srv.close(() => resolve(port));
		});
		srv.on('error', reject);
	});

const chromium = ensureChromium();
if (!process.env.E2E_SKIP_BUILD) {
	const build = spawnSync('npx', ['vite', 'build', '--logLevel', 'error'], { stdio: 'inherit' });
	if (build.status !== 0) process.exit(build.status ?? 1);
}
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-e2e-'));
const env = {
	...process.env,
	CHROMIUM_PATH: chromium,
	E2E_PORT: String(await freePort()),
	E2E_DATA_DIR: dataDir
};
const result = spawnSync('npx', ['playwright', 'test', ...process.argv.slice(2)], { stdio: 'inherit', env });
fs.rmSync(dataDir, { recursive: true, force: true });
process.exit(result.status ?? 1);
