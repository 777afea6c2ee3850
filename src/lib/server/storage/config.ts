// Where photos go: an S3-compatible object store when S3_BUCKET is set; otherwise the local fake
// S3 server once the app has started it (TIDEMARK_FAKE_S3=1, see fakes/s3.ts); otherwise the
// local folder DATA_DIR/uploads (in memory under DATA_DIR=memory://, the tests). Each variable is
// checked in env.ts; the settings that only make sense together are checked here.
import { EnvError, env, readEnv, type Env } from '$lib/server/env';

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

/** A photo-storage setting the server cannot use; an EnvError, so start-up stops naming it. */
export class StorageConfigError extends EnvError {}

const g = globalThis as unknown as { __tidemarkFakeS3?: S3Settings | null };

/**
 * The object store's settings, or null for the local folder. Throws on a half setting. `source`
 * is for tests; the server reads its checked environment.
 */
export function s3Settings(source?: Record<string, string | undefined>): S3Settings | null {
	const e: Env = source ? readEnv(source) : env();
	if (!e.S3_BUCKET) {
		const stray = (
			['S3_ENDPOINT', 'S3_ACCESS_KEY_ID', 'S3_SECRET_ACCESS_KEY', 'S3_FORCE_PATH_STYLE'] as const
		).filter((k) => e[k] !== undefined);
		if (stray.length) {
			throw new StorageConfigError(
				stray.map((name) => ({
					name,
					message:
						'set but S3_BUCKET is not: set S3_BUCKET to keep photos in the object store, or unset the S3_ settings to keep them in DATA_DIR/uploads'
				}))
			);
		}
		return g.__tidemarkFakeS3 ?? null;
	}
	if (Boolean(e.S3_ACCESS_KEY_ID) !== Boolean(e.S3_SECRET_ACCESS_KEY)) {
		throw new StorageConfigError([
			{
				name: e.S3_ACCESS_KEY_ID ? 'S3_SECRET_ACCESS_KEY' : 'S3_ACCESS_KEY_ID',
				message: 'set both S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY, or neither'
			}
		]);
	}
	const pathStyle = e.S3_FORCE_PATH_STYLE;
	return {
		bucket: e.S3_BUCKET,
		endpoint: e.S3_ENDPOINT,
		region: e.S3_REGION,
		credentials:
			e.S3_ACCESS_KEY_ID && e.S3_SECRET_ACCESS_KEY
				? { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY }
				: undefined,
		// A custom endpoint is usually a self-hosted store, which seldom has per-bucket host names.
		forcePathStyle:
			pathStyle === undefined ? Boolean(e.S3_ENDPOINT) : pathStyle === '1' || pathStyle === 'true',
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
