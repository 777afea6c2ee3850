// Over 300 lines on purpose: a spec suite: every photo route and its refusals, run against each store.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import exifr from 'exifr';
import sharp from 'sharp';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { attachments } from '$lib/server/db/schema/attachments';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import { recordEvent } from '$lib/server/runs/commit';
import * as library from '$lib/server/flows/queries';
import { getStore } from '$lib/server/storage';
import { jpegWithGps, png } from '$lib/server/photos/fixtures';
import type { PhotoErrorResponse, PhotoListResponse, PhotoUploadResponse } from '$lib/photos/api';
import { MAX_PHOTO_BYTES } from '$lib/photos/limits';
import { GET as listJobPhotos, POST as uploadJobPhoto } from '../jobs/[id]/photos/+server';
import { GET as listRunPhotos, POST as uploadRunPhoto } from '../runs/[id]/photos/+server';
import { DELETE as deletePhoto, PATCH as patchPhoto } from './[id]/+server';
import { GET as servePhoto } from '../../photos/[id]/[size]/+server';

/**
 * The photo routes end to end, run against each blob store: `api.spec.ts` (in memory) and
 * `api-s3.spec.ts` (the local fake S3 server). The handlers are called directly with a minimal
 * RequestEvent against the in-memory PGlite (DATA_DIR=memory:// in vite.config.ts); the store is
 * whichever `getStore()` picks from the environment the calling spec set up.
 */
export function photoApiSuite() {
	async function blobCount() {
		let n = 0;
		for await (const key of getStore().keys()) n += key ? 1 : 0;
		return n;
	}

	type User = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
	let tech: User;
	let other: User;
	let senior: User;
	let jobId: string;

	const FLOW = 'restart-loop-after-liquid';
	const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-photos-'));
	afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

	function event(
		pathname: string,
		routeId: string,
		init: RequestInit & { user?: User | null; params?: Record<string, string> } = {}
	) {
		const url = new URL(`http://shop.test${pathname}`);
		const { user = tech, params = {}, ...req } = init;
		// eslint-disable-next-line @typescript-eslint/no-explicit-any
		return { url, request: new Request(url, req), locals: { user }, params, route: { id: routeId } } as any;
	}

	function upload(
		file: Uint8Array | string,
		name: string,
		type: string,
		fields: Record<string, string> = {}
	) {
		const form = new FormData();
		form.set('file', new File([file as BlobPart], name, { type }));
		for (const [k, v] of Object.entries(fields)) form.set(k, v);
		return { method: 'POST', body: form };
	}

	const postJob = (id: string, init: ReturnType<typeof upload>, user: User | null = tech) =>
		uploadJobPhoto(
			event(`/api/jobs/${id}/photos`, '/api/jobs/[id]/photos', { ...init, user, params: { id } })
		);

	const serve = (id: string, size: string, user: User | null = tech, headers: HeadersInit = {}) =>
		servePhoto(
			event(`/photos/${id}/${size}`, '/photos/[id]/[size]', { user, headers, params: { id, size } })
		);

	async function thrownStatus(work: () => unknown) {
		try {
			await work();
		} catch (e) {
			return (e as { status?: number }).status;
		}
		return 200;
	}

	beforeAll(async () => {
		const make = async (name: string, email: string, role: User['role']) => {
			const u = await staff.create(null, { name, email, role, password: `${role}-password-1` });
			return { id: u.id, name: u.name, email: u.email, role };
		};
		tech = await make('Mira Saltmarsh', 'mira@shop.test', 'technician');
		other = await make('Ilya Brackwater', 'ilya@shop.test', 'technician');
		senior = await make('Ness Tiller', 'ness@shop.test', 'senior');
		const body14 = '00440000000001'; // invented test IMEI body, check digit computed
		const job = await jobs.create(
			tech.id,
			makeJobIntake().parse({
				customerName: 'Orla Fenwick',
				customerPhone: '+00 555 0142',
				maker: 'Corvana',
				model: 'Tern 5',
				imei: `${body14}${imeiCheckDigit(body14)}`,
				symptoms: ['restart-loop'],
				liquid: 'fresh',
				submerged: false,
				passcodeStatus: 'withheld',
				consentToOpen: true
			})
		);
		jobId = job.id;
		fs.copyFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), path.join(tmp, `${FLOW}.flow.yaml`));
		expect((await library.importFromFiles(tmp)).imported).toHaveLength(1);
	});

	describe('POST /api/jobs/:id/photos', () => {
		it('refuses a request carrying more than one file (one photo per request) and stores none of them', async () => {
			const db = await getDb();
			const before = (await db.select().from(attachments)).length;
			const form = new FormData();
			for (let i = 0; i < 3; i++)
				form.append('file', new File([await png(64 + 2 * i, 48)], `p${i}.png`, { type: 'image/png' }));
			form.append('extra', new File([await png(80, 48)], 'other.png', { type: 'image/png' }));
			const res = await postJob(jobId, { method: 'POST', body: form });
			expect(res.status).toBe(400);
			expect(await res.json()).toEqual({
				message: 'One photo per request: this one carries 4 files. Send each photo on its own.',
				code: 'bad-request'
			});
			expect((await db.select().from(attachments)).length).toBe(before);
		});

		it('stores a JPEG carrying GPS with every metadata block removed (checked with exifr)', async () => {
			const input = await jpegWithGps();
			expect(await exifr.gps(input)).toBeDefined(); // the fixture does carry GPS
			const res = await postJob(
				jobId,
				upload(input, 'bench.jpg', 'image/jpeg', { source: 'microscope', caption: ' Corrosion at the flex ' })
			);
			expect(res.status).toBe(201);
			const body = (await res.json()) as PhotoUploadResponse;
			expect(body.duplicate).toBe(false);
			expect(body.photo).toMatchObject({
				jobId,
				source: 'microscope',
				caption: 'Corrosion at the flex',
				mime: 'image/jpeg',
				width: 300,
				height: 400,
				uploadedByName: 'Mira Saltmarsh',
				shownToCustomer: false
			});
			// Read back what the store holds and what the route serves.
			const [row] = await (await getDb()).select().from(attachments).where(eq(attachments.id, body.photo.id));
			const stored = await getStore().get(row.originalKey);
			expect(await exifr.parse(stored!, true)).toBeUndefined();
			const served = new Uint8Array(await (await serve(body.photo.id, 'original')).arrayBuffer());
			expect(served).toEqual(stored);
			expect(await exifr.gps(served)).toBeUndefined();
			for (const size of ['thumb', 'display']) {
				const bytes = new Uint8Array(await (await serve(body.photo.id, size)).arrayBuffer());
				const meta = await sharp(bytes).metadata();
				expect([meta.format, meta.exif, meta.xmp]).toEqual(['webp', undefined, undefined]);
			}
			const audit = await (
				await getDb()
			)
				.select()
				.from(auditLog)
				.where(and(eq(auditLog.action, 'photo.add'), eq(auditLog.targetId, jobId)));
			expect(audit.map((a) => a.details)).toContainEqual(expect.objectContaining({ photoId: body.photo.id }));
		});

		it('accepts a PNG named .jpg and declared image/jpeg as what it is: PNG', async () => {
			const res = await postJob(jobId, upload(await png(50, 40), 'renamed.jpg', 'image/jpeg'));
			expect(res.status).toBe(201);
			const { photo } = (await res.json()) as PhotoUploadResponse;
			expect([photo.mime, photo.width, photo.height, photo.source]).toEqual(['image/png', 50, 40, 'phone']);
			const served = await serve(photo.id, 'original');
			expect(served.headers.get('content-type')).toBe('image/png');
		});

		it('refuses a text file named .jpg and declared image/jpeg (415, with the reason)', async () => {
			const res = await postJob(
				jobId,
				upload('just some notes, not a picture\n'.repeat(10), 'photo.jpg', 'image/jpeg')
			);
			expect(res.status).toBe(415);
			const body = (await res.json()) as PhotoErrorResponse;
			expect(body.code).toBe('not-an-image');
			expect(body.message).toMatch(/not an image.*whatever its name says/);
		});

		it('refuses a truncated JPEG (422, damaged or incomplete)', async () => {
			const whole = await jpegWithGps();
			const res = await postJob(
				jobId,
				upload(whole.subarray(0, whole.byteLength / 2), 'cut.jpg', 'image/jpeg')
			);
			expect(res.status).toBe(422);
			expect(((await res.json()) as PhotoErrorResponse).code).toBe('corrupt');
		});

		it('refuses a file over 15 MiB (413) and stores nothing', async () => {
			const db = await getDb();
			const before = (await db.select().from(attachments)).length;
			const res = await postJob(jobId, upload(new Uint8Array(MAX_PHOTO_BYTES + 1), 'huge.jpg', 'image/jpeg'));
			expect(res.status).toBe(413);
			const body = (await res.json()) as PhotoErrorResponse;
			expect(body.code).toBe('too-big');
			expect(body.message).toMatch(/at most 15\.0 MB/);
			expect((await db.select().from(attachments)).length).toBe(before);
		});

		it('answers 400 for a missing file, a bad source and a JSON body; 404 for an unknown job', async () => {
			const noFile = await uploadJobPhoto(
				event(`/api/jobs/${jobId}/photos`, '/api/jobs/[id]/photos', {
					method: 'POST',
					body: new FormData(),
					params: { id: jobId }
				})
			);
			expect(noFile.status).toBe(400);
			const badSource = await postJob(
				jobId,
				upload(await png(), 'a.png', 'image/png', { source: 'scanner' })
			);
			expect(badSource.status).toBe(400);
			expect(((await badSource.json()) as PhotoErrorResponse).message).toMatch(/phone or microscope/);
			const asJson = await uploadJobPhoto(
				event(`/api/jobs/${jobId}/photos`, '/api/jobs/[id]/photos', {
					method: 'POST',
					body: '{}',
					headers: { 'content-type': 'application/json' },
					params: { id: jobId }
				})
			);
			expect(asJson.status).toBe(400);
			const unknown = '00000000-0000-4000-8000-000000000000';
			expect((await postJob(unknown, upload(await png(), 'a.png', 'image/png'))).status).toBe(404);
			expect((await postJob('not-a-uuid', upload(await png(), 'a.png', 'image/png'))).status).toBe(404);
		});

		it('stores the same bytes once: a repeat upload returns the stored photo (200), elsewhere shares the files', async () => {
			const bytes = await png(30, 20);
			const first = (await (
				await postJob(jobId, upload(bytes, 'a.png', 'image/png'))
			).json()) as PhotoUploadResponse;
			const blobs = await blobCount();
			const again = await postJob(jobId, upload(bytes, 'copy.png', 'image/png'));
			expect(again.status).toBe(200);
			const second = (await again.json()) as PhotoUploadResponse;
			expect([second.duplicate, second.photo.id]).toEqual([true, first.photo.id]);
			expect(await blobCount()).toBe(blobs);

			// The same picture on another job is a second record over the very same three files.
			const otherJob = await jobs.create(
				tech.id,
				makeJobIntake().parse({
					customerName: 'Pell Harrow',
					customerPhone: '+00 555 0143',
					maker: 'Corvana',
					model: 'Tern 6',
					serial: 'CVTN6SERIAL01',
					liquid: 'unknown',
					submerged: false,
					passcodeStatus: 'not-needed'
				})
			);
			const elsewhere = (await (
				await postJob(otherJob.id, upload(bytes, 'b.png', 'image/png'))
			).json()) as PhotoUploadResponse;
			expect(elsewhere.photo.id).not.toBe(first.photo.id);
			expect(await blobCount()).toBe(blobs);
			const db = await getDb();
			const keys = await db
				.select({ o: attachments.originalKey, t: attachments.thumbKey })
				.from(attachments)
				.where(
					eq(
						attachments.sha256,
						(await db.select().from(attachments).where(eq(attachments.id, first.photo.id)))[0].sha256
					)
				);
			expect(new Set(keys.map((k) => k.o)).size).toBe(1);

			// Removing one keeps the files the other still uses.
			const del = await deletePhoto(
				event(`/api/photos/${elsewhere.photo.id}`, '/api/photos/[id]', {
					method: 'DELETE',
					params: { id: elsewhere.photo.id }
				})
			);
			expect(del.status).toBe(204);
			expect(await blobCount()).toBe(blobs);
			expect((await serve(first.photo.id, 'thumb')).status).toBe(200);
		});
	});

	describe('run photos', () => {
		it('files a photo under the run, its step and its job; refuses a step the flow does not have', async () => {
			const run = await runs.start(jobId, FLOW, tech);
			const pngBytes = await png(40, 40);
			const post = (fields: Record<string, string>) =>
				uploadRunPhoto(
					event(`/api/runs/${run.id}/photos`, '/api/runs/[id]/photos', {
						...upload(pngBytes, 'step.png', 'image/png', fields),
						params: { id: run.id }
					})
				);
			const ok = await post({ stepId: 'power-on-as-received', source: 'phone' });
			expect(ok.status).toBe(201);
			const { photo } = (await ok.json()) as PhotoUploadResponse;
			expect(photo).toMatchObject({ jobId, runId: run.id, stepId: 'power-on-as-received' });

			// A step not answered yet is fine (the screen runs ahead of the server); one the flow lacks is not.
			const ahead = await post({ stepId: 'open-and-disconnect' });
			expect(ahead.status).toBe(201);
			const unknown = await post({ stepId: 'no-such-step' });
			expect(unknown.status).toBe(400);
			expect(((await unknown.json()) as PhotoErrorResponse).code).toBe('unknown-step');
			expect((await post({})).status).toBe(400);

			// Once the step is answered, a photo of it is tied to that recorded answer too.
			await recordEvent(
				run.id,
				{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: 'photo-spec-answer-1' },
				tech
			);
			const later = uploadRunPhoto(
				event(`/api/runs/${run.id}/photos`, '/api/runs/[id]/photos', {
					...upload(await png(24, 24), 'later.png', 'image/png', { stepId: 'power-on-as-received' }),
					params: { id: run.id }
				})
			);
			const laterPhoto = ((await (await later).json()) as PhotoUploadResponse).photo;
			const [laterRow] = await (
				await getDb()
			)
				.select()
				.from(attachments)
				.where(eq(attachments.id, laterPhoto.id));
			const [firstRow] = await (await getDb()).select().from(attachments).where(eq(attachments.id, photo.id));
			expect(firstRow.runStepId).toBeNull();
			expect(laterRow.runStepId).toEqual(expect.any(Number));

			const list = (await (
				await listRunPhotos(
					event(`/api/runs/${run.id}/photos?stepId=power-on-as-received`, '/api/runs/[id]/photos', {
						params: { id: run.id }
					})
				)
			).json()) as PhotoListResponse;
			expect(list.photos.map((p) => p.id)).toEqual([photo.id, laterPhoto.id]);
			const forJob = (await (
				await listJobPhotos(
					event(`/api/jobs/${jobId}/photos`, '/api/jobs/[id]/photos', { params: { id: jobId } })
				)
			).json()) as PhotoListResponse;
			expect(forJob.photos.map((p) => p.id)).toContain(photo.id);
		});
	});

	describe('access', () => {
		let photoId: string;
		beforeAll(async () => {
			const res = await postJob(jobId, upload(await png(20, 20), 'access.png', 'image/png'));
			photoId = ((await res.json()) as PhotoUploadResponse).photo.id;
		});

		it('serves an image only to signed-in staff: a signed-out visitor is sent to sign in', async () => {
			const e = await Promise.resolve()
				.then(() => serve(photoId, 'thumb', null))
				.then(
					() => null,
					(err: unknown) => err as { status: number; location: string }
				);
			expect(e?.status).toBe(303);
			expect(e?.location).toMatch(/^\/signin\?next=%2Fphotos%2F/);
		});

		it('answers 401 to signed-out API callers', async () => {
			expect(
				await thrownStatus(() => postJob(jobId, upload(new Uint8Array(4), 'a.png', 'image/png'), null))
			).toBe(401);
			expect(
				await thrownStatus(() =>
					listJobPhotos(
						event(`/api/jobs/${jobId}/photos`, '/api/jobs/[id]/photos', { user: null, params: { id: jobId } })
					)
				)
			).toBe(401);
			expect(
				await thrownStatus(() =>
					deletePhoto(
						event(`/api/photos/${photoId}`, '/api/photos/[id]', {
							method: 'DELETE',
							user: null,
							params: { id: photoId }
						})
					)
				)
			).toBe(401);
		});

		it('serves with the stored type, nosniff, inline, a long private cache and an ETag', async () => {
			const res = await serve(photoId, 'thumb');
			expect(res.status).toBe(200);
			expect(res.headers.get('content-type')).toBe('image/webp');
			expect(res.headers.get('x-content-type-options')).toBe('nosniff');
			expect(res.headers.get('content-disposition')).toMatch(/^inline/);
			expect(res.headers.get('cache-control')).toBe('private, max-age=31536000, immutable');
			const etag = res.headers.get('etag')!;
			expect(etag).toMatch(/^"[0-9a-f]{64}"$/);
			expect((await serve(photoId, 'thumb', tech, { 'if-none-match': etag })).status).toBe(304);
			expect(await thrownStatus(() => serve(photoId, 'huge'))).toBe(404);
			expect(await thrownStatus(() => serve('../../etc', 'thumb'))).toBe(404);
		});

		it('lets only the uploader or a senior change or remove a photo, and audits it', async () => {
			const patch = (user: User, body: unknown) =>
				patchPhoto(
					event(`/api/photos/${photoId}`, '/api/photos/[id]', {
						method: 'PATCH',
						body: JSON.stringify(body),
						headers: { 'content-type': 'application/json' },
						user,
						params: { id: photoId }
					})
				);
			expect((await patch(other, { caption: 'not mine' })).status).toBe(403);
			const byOwner = await patch(tech, { caption: 'Indicator pink', shownToCustomer: true });
			expect(byOwner.status).toBe(200);
			expect((await byOwner.json()).photo).toMatchObject({
				caption: 'Indicator pink',
				shownToCustomer: true
			});
			expect((await patch(senior, { shownToCustomer: false })).status).toBe(200);
			expect((await patch(tech, {})).status).toBe(400);

			const del = (user: User) =>
				deletePhoto(
					event(`/api/photos/${photoId}`, '/api/photos/[id]', {
						method: 'DELETE',
						user,
						params: { id: photoId }
					})
				);
			expect((await del(other)).status).toBe(403);
			expect((await del(senior)).status).toBe(204);
			expect((await del(senior)).status).toBe(404);
			expect(await thrownStatus(() => serve(photoId, 'thumb'))).toBe(404);
			const db = await getDb();
			const removed = await db.select().from(auditLog).where(eq(auditLog.action, 'photo.remove'));
			expect(removed.map((r) => [r.actorId, (r.details as { photoId: string }).photoId])).toContainEqual([
				senior.id,
				photoId
			]);
		});
	});
}
