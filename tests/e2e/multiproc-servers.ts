// The servers of tests/e2e/multiproc.spec.ts: `node build` started by the test itself (not by
// Playwright's webServer, which is one process), and a mail server that records what it receives.
import { spawn } from 'node:child_process';
import net from 'node:net';
import { SMTPServer } from 'smtp-server';

const freePort = () =>
	new Promise<number>((resolve) => {
		const srv = net.createServer().listen(0, '127.0.0.1', () => {
			const { port } = srv.address() as net.AddressInfo;
			srv.close(() => resolve(port));
		});
	});

export type App = Awaited<ReturnType<typeof startApp>>;

/** One `node build` process on its own port; resolves once /api/health answers. */
export async function startApp({ dataDir, env }: { dataDir: string; env: Record<string, string> }) {
	const port = await freePort();
	const base = `http://127.0.0.1:${port}`;
	const origin = `http://localhost:${port}`;
	const child = spawn(process.execPath, ['build'], {
		env: {
			...process.env,
			PORT: String(port),
			ORIGIN: origin,
			DATA_DIR: dataDir,
			AUTH_SECRET: 'multiproc-secret-multiproc-secret-0123456789',
			...env
		},
		stdio: ['ignore', 'ignore', 'pipe']
	});
	let log = '';
	child.stderr!.on('data', (c: Buffer) => (log = (log + c.toString()).slice(-20_000)));
	const deadline = Date.now() + 120_000;
	for (;;) {
		if (child.exitCode !== null) throw new Error(`server exited with ${child.exitCode}:\n${log}`);
		if (Date.now() > deadline) throw new Error(`server did not answer in 120 s:\n${log}`);
		try {
			if ((await fetch(`${base}/api/health`)).status === 200) break;
		} catch {
			// not listening yet
		}
		await new Promise((r) => setTimeout(r, 100));
	}

	async function json(method: string, url: string, cookie: string, body?: unknown) {
		const res = await fetch(base + url, {
			method,
			headers: { cookie, 'content-type': 'application/json', origin },
			body: body === undefined ? undefined : JSON.stringify(body)
		});
		const text = await res.text();
		if (!res.ok) throw new Error(`${method} ${url} on ${port}: ${res.status} ${text}`);
		return text ? JSON.parse(text) : undefined;
	}

	/** Posts a form action the way the page's enhanced form does; answers the action's result type. */
	async function form(url: string, cookie: string, fields: Record<string, string>) {
		const res = await fetch(base + url, {
			method: 'POST',
			headers: { cookie, origin, 'x-sveltekit-action': 'true', accept: 'application/json' },
			body: new URLSearchParams(fields)
		});
		return ((await res.json()) as { type: string }).type;
	}

	/** Signs in through the app's own form; the session cookie works on either process (one AUTH_SECRET). */
	async function signIn(email: string) {
		const res = await fetch(`${base}/signin`, {
			method: 'POST',
			redirect: 'manual',
			headers: { 'content-type': 'application/x-www-form-urlencoded', origin },
			body: new URLSearchParams({ email, password: env.DEMO_PASSWORD })
		});
		const cookies = res.headers.getSetCookie().map((c) => c.split(';')[0]);
		if (!cookies.some((c) => c.includes('session-token'))) throw new Error(`sign-in failed: ${res.status}`);
		return cookies.join('; ');
	}

	const stop = () =>
		new Promise<void>((resolve) => {
			if (child.exitCode !== null) return resolve();
			child.once('exit', () => resolve());
			child.kill('SIGTERM');
		});
	return { base, port, json, form, signIn, stop, log: () => log };
}

export type MailSink = Awaited<ReturnType<typeof startMailSink>>;

/**
 * A mail server that keeps the X-Tidemark-Mail-Id of every message it accepts (the worker sets it
 * to the queue row's id). Each message takes a little while, so two workers' passes overlap.
 */
export async function startMailSink() {
	const ids: string[] = [];
	const server = new SMTPServer({
		authOptional: true,
		disabledCommands: ['AUTH', 'STARTTLS'],
		closeTimeout: 500,
		logger: false,
		onData(stream, _session, cb) {
			const chunks: Buffer[] = [];
			stream.on('data', (c: Buffer) => chunks.push(c));
			stream.on('end', () => {
				const id = /^X-Tidemark-Mail-Id:\s*(\S+)/im.exec(Buffer.concat(chunks).toString('utf8'))?.[1];
				ids.push(id ?? 'no id');
				setTimeout(() => cb(), 30);
			});
		}
	});
	const port = await freePort();
	await new Promise<void>((r) => server.listen(port, '127.0.0.1', () => r()));
	return {
		url: `smtp://127.0.0.1:${port}`,
		received: () => [...ids],
		stop: () => new Promise<void>((r) => server.close(() => r()))
	};
}
