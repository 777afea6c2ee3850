import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { asc, eq } from 'drizzle-orm';
import { DeleteObjectCommand, ListObjectsV2Command } from '@aws-sdk/client-s3';
import { getDb } from '$lib/server/db';
import { attachments } from '$lib/server/db/schema/attachments';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import { runFakeS3, type FakeS3 } from '$lib/server/fakes/s3';
import { getStore, S3Store } from '$lib/server/storage';
import { jpegWithGps } from '$lib/server/photos/fixtures';
import type { PhotoUploadResponse } from '$lib/photos/api';
import { POST as uploadJobPhoto } from '../jobs/[id]/photos/+server';
import { GET as servePhoto } from '../../photos/[id]/[size]/+server';
import { photoApiSuite } from './photo-suite';

// The same photo routes with the photos in an S3-compatible object store: the local fake S3 server
// on a free port, its objects in a temp folder, reached through the S3_* settings as in production.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-photos-s3-'));
let fake: FakeS3;
const s3Env = [
	'S3_BUCKET',
	'S3_ENDPOINT',
	'S3_REGION',
	'S3_ACCESS_KEY_ID',
	'S3_SECRET_ACCESS_KEY',
	'S3_FORCE_PATH_STYLE'
];

beforeAll(async () => {
	fake = await runFakeS3({ dir, bucket: 'shop-photos' });
	Object.assign(process.env, {
		S3_BUCKET: fake.settings.bucket,
		S3_ENDPOINT: fake.settings.endpoint,
		S3_REGION: 'us-east-1',
		S3_ACCESS_KEY_ID: 'S3RVER',
		S3_SECRET_ACCESS_KEY: 'S3RVER',
		S3_FORCE_PATH_STYLE: 'true'
	});
});
afterAll(async () => {
	for (const k of s3Env) delete process.env[k];
	await fake?.stop();
	fs.rmSync(dir, { recursive: true, force: true });
});

it('uses the object store named by the S3 settings', () => {
	const store = getStore();
	expect(store).toBeInstanceOf(S3Store);
	expect((store as S3Store).bucket).toBe('shop-photos');
});

photoApiSuite();

describe('photos in the object store', () => {
	type User = { id: string; name: string; email: string; role: 'technician' };
	let tech: User;
	let jobId: string;

	function event(pathname: string, routeId: string, params: Record<string, string>, init: RequestInit = {}) {
		const url = new URL(`http://shop.test${pathname}`);
		return {
			url,
			request: new Request(url, init),
			locals: { user: tech },
			params,
			route: { id: routeId }
			// eslint-disable-next-line @typescript-eslint/no-explicit-any
		} as any;
	}
	const serve = (id: string, size: string) =>
		servePhoto(event(`/photos/${id}/${size}`, '/photos/[id]/[size]', { id, size }));
	const listBucket = async () =>
		(
			await (getStore() as S3Store).client.send(new ListObjectsV2Command({ Bucket: 'shop-photos' }))
		).Contents?.map((o) => o.Key!) ?? [];

	beforeAll(async () => {
		const u = await staff.create(null, {
			name: 'Tove Reedbank',
			email: 'tove@shop.test',
			role: 'technician',
			password: 'technician-password-1'
		});
		tech = { id: u.id, name: u.name, email: u.email, role: 'technician' };
		const body14 = '00440000000002'; // invented test IMEI body, check digit computed
		jobId = (
			await jobs.create(
				tech.id,
				makeJobIntake().parse({
					customerName: 'Ansel Moorcroft',
					customerPhone: '+00 555 0177',
					maker: 'Corvana',
					model: 'Tern 5',
					imei: `${body14}${imeiCheckDigit(body14)}`,
					liquid: 'fresh',
					submerged: false,
					passcodeStatus: 'withheld'
				})
			)
		).id;
	});

	it('uploads through the app route into the bucket and reads it back through the app route', async () => {
		const form = new FormData();
		form.set('file', new File([await jpegWithGps()], 'board.jpg', { type: 'image/jpeg' }));
		const res = await uploadJobPhoto(
			event(
				`/api/jobs/${jobId}/photos`,
				'/api/jobs/[id]/photos',
				{ id: jobId },
				{ method: 'POST', body: form }
			)
		);
		expect(res.status).toBe(201);
		const { photo } = (await res.json()) as PhotoUploadResponse;
		// The browser is only ever given the app's own addresses, never the store's.
		for (const url of [photo.thumbUrl, photo.displayUrl, photo.originalUrl]) {
			expect(url).toMatch(/^\/photos\//);
			expect(url).not.toContain(fake.settings.endpoint);
		}
		const [row] = await (await getDb()).select().from(attachments).where(eq(attachments.id, photo.id));
		const objects = await listBucket();
		for (const key of [row.originalKey, row.displayKey, row.thumbKey]) {
			expect(objects).toContain(`${key.slice(0, 2)}/${key.slice(2, 4)}/${key}`);
		}
		const served = await serve(photo.id, 'original');
		expect(served.status).toBe(200);
		expect(served.headers.get('cache-control')).toBe('private, max-age=31536000, immutable');
		const bytes = Buffer.from(await served.arrayBuffer());
		expect(bytes.equals(Buffer.from((await getStore().get(row.originalKey))!))).toBe(true);
		// The object files of the fake sit in its own folder, nowhere under the data folder.
		expect(fs.readdirSync(dir)).toContain('shop-photos');
	});

	it('answers 404, not 500, for a photo whose object is gone from the bucket', async () => {
		const form = new FormData();
		const { png } = await import('$lib/server/photos/fixtures');
		form.set('file', new File([await png(36, 28)], 'gone.png', { type: 'image/png' }));
		const res = await uploadJobPhoto(
			event(
				`/api/jobs/${jobId}/photos`,
				'/api/jobs/[id]/photos',
				{ id: jobId },
				{ method: 'POST', body: form }
			)
		);
		const { photo } = (await res.json()) as PhotoUploadResponse;
		const [row] = await (await getDb()).select().from(attachments).where(eq(attachments.id, photo.id));
		const store = getStore() as S3Store;
		await store.client.send(
			new DeleteObjectCommand({ Bucket: store.bucket, Key: store.objectName(row.thumbKey) })
		);
		const status = await Promise.resolve(serve(photo.id, 'thumb')).then(
			(r) => r.status,
			(e: { status?: number }) => e.status
		);
		expect(status).toBe(404);
		expect((await serve(photo.id, 'original')).status).toBe(200);
	});

	it('fails (500), never answers "no such photo", when the store cannot be reached', async () => {
		// The suite's first photo: kept to the end, all three files in place.
		const [row] = await (
			await getDb()
		)
			.select()
			.from(attachments)
			.orderBy(asc(attachments.createdAt))
			.limit(1);
		const endpoint = process.env.S3_ENDPOINT;
		process.env.S3_ENDPOINT = 'http://127.0.0.1:9'; // nothing listens on the discard port
		try {
			const outcome = await Promise.resolve(serve(row.id, 'thumb')).then(
				(r) => ({ status: r.status }),
				(e: { status?: number }) => ({ status: e.status, thrown: true })
			);
			// Not an HttpError: SvelteKit turns it into a 500 and logs it.
			expect(outcome).toEqual({ status: undefined, thrown: true });
		} finally {
			process.env.S3_ENDPOINT = endpoint;
		}
		expect((await serve(row.id, 'thumb')).status).toBe(200);
	});
});
