#!/usr/bin/env node
// `npm start`: builds when the build is missing or older than the sources, then serves the app with
// the demo shop on the embedded database. The app itself migrates and seeds at start-up.
import { spawn, spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..');
const dataDir = path.resolve(root, process.env.DATA_DIR || 'data');
const port = Number(process.env.PORT || 3000);
const origin = process.env.ORIGIN || `http://localhost:${port}`;

function newestMtime(dir) {
	let newest = 0;
	if (!fs.existsSync(dir)) return newest;
	for (const entry of fs.readdirSync(dir, { withFileTypes: true, recursive: true })) {
		if (entry.isFile())
			newest = Math.max(newest, fs.statSync(path.join(entry.parentPath, entry.name)).mtimeMs);
	}
	return newest;
}

function needsBuild() {
	const handler = path.join(root, 'build', 'handler.js');
	if (!fs.existsSync(handler)) return true;
	const built = fs.statSync(handler).mtimeMs;
	const sources = ['src', 'drizzle', 'static', 'flows'].map((d) => newestMtime(path.join(root, d)));
	sources.push(
		...['package.json', 'svelte.config.js', 'vite.config.ts', 'tailwind.config.ts'].map(
			(f) => fs.statSync(path.join(root, f)).mtimeMs
		)
	);
	return Math.max(...sources) > built;
}

function authSecret() {
	if (process.env.AUTH_SECRET) return process.env.AUTH_SECRET;
	// The demo keeps its own secret in the data folder (never committed: data/ is git-ignored).
	const file = path.join(dataDir, 'auth-secret');
	if (!fs.existsSync(file)) {
		fs.mkdirSync(dataDir, { recursive: true });
		fs.writeFileSync(file, crypto.randomBytes(32).toString('base64url'), { mode: 0o600 });
	}
	return fs.readFileSync(file, 'utf8').trim();
}

if (needsBuild()) {
	console.log('Building Tidemark (first start or changed sources)…');
	const result = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
	if (result.status !== 0) process.exit(result.status ?? 1);
}

const demoPassword = process.env.DEMO_PASSWORD || 'tidemark-demo';
const env = {
	...process.env,
	PORT: String(port),
	ORIGIN: origin,
	DATA_DIR: dataDir,
	AUTH_SECRET: authSecret(),
	DEMO_PASSWORD: demoPassword,
	TIDEMARK_DEMO: '1',
	BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT || '20M'
};
const server = spawn(process.execPath, [path.join(root, 'build')], { cwd: root, env, stdio: 'inherit' });
for (const signal of ['SIGINT', 'SIGTERM']) process.on(signal, () => server.kill(signal));
server.on('exit', (code) => process.exit(code ?? 0));

// Announce once the app answers (once: polls still in flight may answer after the first).
const started = Date.now();
let announced = false;
const poll = setInterval(async () => {
	try {
		const res = await fetch(`http://127.0.0.1:${port}/api/health`);
		if (!res.ok || announced) return;
		announced = true;
		clearInterval(poll);
		console.log(
			`\nTidemark demo is up at ${origin}  (started in ${((Date.now() - started) / 1000).toFixed(1)} s)`
		);
		console.log(
			`Sign in as lead@tidemark.test, senior@tidemark.test or tech@tidemark.test — password: ${demoPassword}`
		);
		if (process.env.TIDEMARK_DEMO_HISTORY !== '0')
			console.log(
				'A new demo writes a year of invented history in the background (progress below); TIDEMARK_DEMO_HISTORY=0 skips it.'
			);
		console.log('Stop with Ctrl+C.\n');
	} catch {
		if (Date.now() - started > 120_000) clearInterval(poll);
	}
}, 250);
