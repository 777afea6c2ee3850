import crypto from 'node:crypto';
import {
	DeleteObjectCommand,
	GetObjectCommand,
	HeadBucketCommand,
	HeadObjectCommand,
	ListObjectsV2Command,
	PutObjectCommand,
	S3Client
} from '@aws-sdk/client-s3';
import { assertStorageKey, isStorageKey, keyOf, type BlobStore } from './keys';
import type { S3Settings } from './config';

/** "No such object", as S3 says it: NoSuchKey from GET, a bare 404 (NotFound) from HEAD. */
function isMissing(e: unknown) {
	const err = e as { name?: string; $metadata?: { httpStatusCode?: number } };
	return err?.name === 'NoSuchKey' || (err?.name === 'NotFound' && err.$metadata?.httpStatusCode === 404);
}

export function s3Client(settings: S3Settings) {
	return new S3Client({
		region: settings.region,
		endpoint: settings.endpoint,
		forcePathStyle: settings.forcePathStyle,
		credentials: settings.credentials,
		// Checksums only where S3 requires them: several S3-compatible stores refuse the SDK's newer
		// default checksum headers. Integrity is checked here instead (the key is the SHA-256).
		requestChecksumCalculation: 'WHEN_REQUIRED',
		responseChecksumValidation: 'WHEN_REQUIRED',
		maxAttempts: 3,
		requestHandler: { connectionTimeout: 5_000, requestTimeout: 30_000 }
	});
}

/**
 * Blobs as objects in one bucket, under the same sharded names as on disk: `ab/cd/abcd…`. Objects
 * are written with no ACL, so they stay as private as the bucket (never make it public); the app
 * serves them through its own signed-in routes, and the keys never leave the server.
 */
export class S3Store implements BlobStore {
	constructor(
		readonly client: S3Client,
		readonly bucket: string
	) {}

	static from(settings: S3Settings) {
		return new S3Store(s3Client(settings), settings.bucket);
	}

	objectName(key: string) {
		assertStorageKey(key);
		return `${key.slice(0, 2)}/${key.slice(2, 4)}/${key}`;
	}

	async put(bytes: Uint8Array) {
		const key = keyOf(bytes);
		if (await this.stat(key)) return { key, size: bytes.byteLength, created: false };
		await this.client.send(
			new PutObjectCommand({
				Bucket: this.bucket,
				Key: this.objectName(key),
				Body: bytes,
				ContentLength: bytes.byteLength,
				ContentType: 'application/octet-stream',
				// A checksum S3 verifies on arrival, so a damaged upload is refused rather than stored.
				ContentMD5: crypto.createHash('md5').update(bytes).digest('base64')
			})
		);
		return { key, size: bytes.byteLength, created: true };
	}

	async get(key: string) {
		let body;
		try {
			body = (
				await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: this.objectName(key) }))
			).Body;
		} catch (e) {
			if (isMissing(e)) return null;
			throw e;
		}
		const bytes = body ? await body.transformToByteArray() : new Uint8Array();
		// The bucket is outside the app's folder and others may hold its keys: bytes that are not
		// what the key names are a fault, never served as the photo.
		if (keyOf(bytes) !== key) throw new Error(`Object ${this.objectName(key)} does not match its key.`);
		return bytes;
	}

	async stat(key: string) {
		try {
			const head = await this.client.send(
				new HeadObjectCommand({ Bucket: this.bucket, Key: this.objectName(key) })
			);
			return { size: head.ContentLength ?? 0 };
		} catch (e) {
			if (isMissing(e)) return null;
			throw e;
		}
	}

	/** S3 answers a delete of a missing object with success too; the HEAD first tells them apart. */
	async delete(key: string) {
		if (!(await this.stat(key))) return false;
		await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: this.objectName(key) }));
		return true;
	}

	async *keys() {
		let token: string | undefined;
		do {
			const page = await this.client.send(
				new ListObjectsV2Command({ Bucket: this.bucket, ContinuationToken: token })
			);
			for (const o of page.Contents ?? []) {
				const name = o.Key?.split('/').pop();
				if (isStorageKey(name) && o.Key === this.objectName(name)) yield name;
			}
			token = page.IsTruncated ? page.NextContinuationToken : undefined;
		} while (token);
	}

	/** Start-up check: the bucket exists and these keys may use it. Throws with S3's reason otherwise. */
	async check() {
		await this.client.send(new HeadBucketCommand({ Bucket: this.bucket }));
	}
}
