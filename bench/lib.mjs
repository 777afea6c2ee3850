// Helpers shared by the benchmarks that drive the built server.
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';

export const median = (xs) => {
	const s = [...xs].sort((a, b) => a - b);
	const m = s.length >> 1;
	return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

export function ensureBuild() {
	if (fs.existsSync('build/handler.js') && !process.env.BENCH_REBUILD) return;
	const r = spawnSync('npx', ['vite', 'build', '--logLevel', 'error'], { stdio: 'inherit' });
	if (r.status !== 0) throw new Error('build failed');
}

export const freePort = () =>
	new Promise((resolve) => {
		const srv = net.createServer().listen(0, '127.0.0.1', () => {
			const { port } = srv.address();
			srv.close(() => resolve(port));
		});
	});

/** Starts `node build` (or another build folder); resolves once /api/health answers 200, with the ms from spawn to that answer. */
export async function startServer({ port, dataDir, build = 'build', env = {} }) {
	const t0 = performance.now();
	// BENCH_SERVER_NODE_ARGS (e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof") profiles the server.
	const nodeArgs = (process.env.BENCH_SERVER_NODE_ARGS ?? '').split(' ').filter(Boolean);
	// The server reads drizzle/ and flows/ from its working directory: each build runs from the
	// project folder it was built in, so an older build meets its own migrations.
	const folder = path.resolve(build);
	const child = spawn(process.execPath, [...nodeArgs, folder], {
		cwd: path.dirname(folder),
		env: {
			...process.env,
			PORT: String(port),
			ORIGIN: `http://localhost:${port}`,
			DATA_DIR: dataDir,
			AUTH_SECRET: 'bench-secret-bench-secret-bench-secret-0123',
			BACKUP_SCHEDULE: 'off', // a scheduled backup mid-measurement would skew the figures
			...env
		},
		stdio: ['ignore', 'ignore', 'inherit']
	});
	for (;;) {
		if (child.exitCode !== null) throw new Error(`server exited with ${child.exitCode}`);
		try {
			const res = await fetch(`http://127.0.0.1:${port}/api/health`);
			if (res.status === 200) break;
		} catch {
			// not listening yet
		}
		await new Promise((r) => setTimeout(r, 10));
	}
	const ms = performance.now() - t0;
	const stop = () =>
		new Promise((resolve) => {
			child.once('exit', resolve);
			child.kill('SIGTERM');
		});
	return { ms, stop, child };
}
