// Where photos go: an S3-compatible object store when S3_BUCKET is set; otherwise the local fake
// S3 server once the app has started it (TIDEMARK_FAKE_S3=1, see fakes/s3.ts); otherwise the
// local folder DATA_DIR/uploads (in memory under DATA_DIR=memory://, the tests).
import { z } from 'zod';

export type S3Settings = {
	bucket: string;
	/** Unset for the provider's own address (derived from the region by the SDK). */
	endpoint?: string;
	region: string;
	/** Unset: the SDK's usual credential chain (instance role, shared profile). */
	credentials?: { accessKeyId: string; secretAccessKey: string };
	forcePathStyle: boolean;
	fake: boolean;
};

const flag = z
	.enum(['1', '0', 'true', 'false', 'yes', 'no', ''], {
		error: 'must be true or false (1/0, yes/no)'
	})
	.transform((v) => v === '1' || v === 'true' || v === 'yes');

const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

const s3Env = z
	.object({
		S3_BUCKET: z
			.string()
			.trim()
			.regex(/^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/, 'must be a bucket name (3–63 of a–z, 0–9, dot, hyphen)'),
		S3_ENDPOINT: z.preprocess(blankToUndefined, z.url({ protocol: /^https?$/ }).optional()),
		S3_REGION: z.preprocess(blankToUndefined, z.string().trim().default('us-east-1')),
		S3_ACCESS_KEY_ID: z.preprocess(blankToUndefined, z.string().trim().optional()),
		S3_SECRET_ACCESS_KEY: z.preprocess(blankToUndefined, z.string().optional()),
		S3_FORCE_PATH_STYLE: z.preprocess(blankToUndefined, flag.optional())
	})
	.refine((e) => Boolean(e.S3_ACCESS_KEY_ID) === Boolean(e.S3_SECRET_ACCESS_KEY), {
		message: 'set both S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY, or neither',
		path: ['S3_SECRET_ACCESS_KEY']
	});

export class StorageConfigError extends Error {}

const g = globalThis as unknown as { __tidemarkFakeS3?: S3Settings | null };

/** The object store's settings, or null for the local folder. Throws on a half or malformed setting. */
export function s3Settings(env: NodeJS.ProcessEnv = process.env): S3Settings | null {
	if (!env.S3_BUCKET?.trim()) {
		const stray = Object.keys(env).filter((k) => k.startsWith('S3_') && env[k]?.trim());
		if (stray.length) {
			throw new StorageConfigError(
				`${stray.join(', ')} ${stray.length > 1 ? 'are' : 'is'} set but S3_BUCKET is not: set S3_BUCKET to store photos in the object store, or unset the rest to keep them in DATA_DIR/uploads.`
			);
		}
		return g.__tidemarkFakeS3 ?? null;
	}
	const parsed = s3Env.safeParse(env);
	if (!parsed.success) {
		const issue = parsed.error.issues[0];
		throw new StorageConfigError(`Photo storage: ${String(issue.path[0] ?? 'S3')} ${issue.message}.`);
	}
	const e = parsed.data;
	return {
		bucket: e.S3_BUCKET,
		endpoint: e.S3_ENDPOINT,
		region: e.S3_REGION,
		credentials: e.S3_ACCESS_KEY_ID
			? { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY! }
			: undefined,
		// A custom endpoint is usually a self-hosted store, which seldom has per-bucket host names.
		forcePathStyle: e.S3_FORCE_PATH_STYLE ?? Boolean(e.S3_ENDPOINT),
		fake: false
	};
}

/** Called when the local fake S3 server starts (and stops: null). */
export function setFakeS3(settings: Omit<S3Settings, 'fake'> | null) {
	g.__tidemarkFakeS3 = settings ? { ...settings, fake: true } : null;
}

/** Which bucket, for the start-up log: never a key. */
export function describeStorage(settings: S3Settings): string {
	const where = settings.endpoint ?? `the provider's ${settings.region} endpoint`;
	return `${settings.fake ? 'local fake S3' : 'S3'} bucket "${settings.bucket}" at ${where}`;
}
