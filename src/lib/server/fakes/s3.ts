// A local stand-in for an S3-compatible object store (the `s3rver` package, a development
// dependency), started by the app when TIDEMARK_FAKE_S3=1 and no real S3_BUCKET is set, and by the
// tests. It listens on 127.0.0.1 only, on a free port, and keeps its objects in a folder.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { dataDir } from '$lib/server/db';
import { env, readEnv } from '$lib/server/env';
import { setFakeS3, type S3Settings } from '$lib/server/storage/config';

export type FakeS3 = {
	settings: Omit<S3Settings, 'fake'>;
	port: number;
	dir: string;
	stop: () => Promise<void>;
};

/** s3rver's one account (its documentation); it refuses other access keys, and unsigned requests are anonymous. */
const credentials = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };

type S3rverInstance = { run(): Promise<{ port: number }>; close(): Promise<void> };
type S3rverClass = new (options: Record<string, unknown>) => S3rverInstance;

async function loadS3rver(): Promise<S3rverClass> {
	try {
		// Named through a variable so the build leaves it out of the server bundle: a development
		// dependency, absent from an install made with --omit=dev, loaded only when asked for.
		const name = 's3rver';
		const mod = (await import(/* @vite-ignore */ name)) as { default: S3rverClass };
		return mod.default;
	} catch (e) {
		throw new Error(
			'The local fake S3 server needs the development dependencies (npm ci without --omit=dev). ' +
				'In production set S3_BUCKET and the other S3_ settings instead of TIDEMARK_FAKE_S3.',
			{ cause: e }
		);
	}
}

export async function runFakeS3(opts: { dir: string; bucket?: string }): Promise<FakeS3> {
	const S3rver = await loadS3rver();
	const bucket = opts.bucket ?? 'tidemark-photos';
	fs.mkdirSync(opts.dir, { recursive: true });
	const server = new S3rver({
		address: '127.0.0.1',
		port: 0,
		silent: true,
		directory: opts.dir,
		configureBuckets: [{ name: bucket }]
	});
	const { port } = await server.run();
	return {
		settings: {
			bucket,
			endpoint: `http://127.0.0.1:${port}`,
			region: 'us-east-1',
			credentials,
			forcePathStyle: true
		},
		port,
		dir: opts.dir,
		stop: () => server.close()
	};
}

const g = globalThis as unknown as { __tidemarkFakeS3Server?: FakeS3 };

/** Whether the app should start the fake: asked for, and no real object store configured. */
export function fakeS3Wanted(source?: Record<string, string | undefined>): boolean {
	const e = source ? readEnv(source) : env();
	return e.TIDEMARK_FAKE_S3 && !e.S3_BUCKET;
}

/**
 * Start-up step: the fake S3 server, when wanted, with its objects in DATA_DIR/fake_s3 (a temp
 * folder when the database is in memory); photos then go to it until stopFakeS3().
 */
export async function startFakeS3(): Promise<FakeS3 | null> {
	if (g.__tidemarkFakeS3Server) return g.__tidemarkFakeS3Server;
	if (!fakeS3Wanted()) return null;
	const base = dataDir();
	const dir = base.startsWith('memory://')
		? fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-fake-s3-'))
		: path.resolve(base, 'fake_s3');
	const fake = await runFakeS3({ dir });
	const temporary = base.startsWith('memory://');
	const stop = fake.stop;
	fake.stop = async () => {
		await stop();
		if (temporary) fs.rmSync(dir, { recursive: true, force: true });
	};
	g.__tidemarkFakeS3Server = fake;
	setFakeS3(fake.settings);
	console.log(
		`[fakes] local S3 server on ${fake.settings.endpoint}, bucket "${fake.settings.bucket}", objects in ${dir}`
	);
	return fake;
}

export async function stopFakeS3() {
	const fake = g.__tidemarkFakeS3Server;
	g.__tidemarkFakeS3Server = undefined;
	if (!fake) return;
	setFakeS3(null);
	await fake.stop();
}
