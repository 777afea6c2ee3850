import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import exifr from 'exifr';
import sharp from 'sharp';
import { getDb } from '$lib/server/db';
import { attachments } from '$lib/server/db/schema/attachments';
import { getStore } from '$lib/server/storage';
import { buildWorld, type World } from '$lib/server/testing/world';
import { quietAuthLog, type Jar } from '$lib/server/testing/events';
import { heicHeader, jpegWithGps, png, pngClaiming } from '$lib/server/photos/fixtures';
import { discoverEntries } from './routes';
import { call, signInJar } from './harness';

// Hostile uploads against both upload routes, as a technician: each is refused with a 4xx and
// stores nothing, or is stored cleaned (re-encoded, no metadata, no name of the sender's choosing).

const uploadRoutes = discoverEntries().filter(
	(e) => e.kind === 'method' && e.name === 'POST' && e.routeId.endsWith('/photos')
);
let w: World;
let jar: Jar;

beforeAll(async () => {
	quietAuthLog();
	w = await buildWorld();
	jar = await signInJar(w.tech.email);
}, 120_000);

const enc = (s: string) => new TextEncoder().encode(s);
const concat = (...parts: Uint8Array[]) => new Uint8Array(Buffer.concat(parts));

async function send(routeKey: string, files: { bytes: Uint8Array; name: string; type: string }[]) {
	const entry = uploadRoutes.find((e) => e.key === routeKey)!;
	const form = new FormData();
	for (const f of files) form.append('file', new File([f.bytes as BlobPart], f.name, { type: f.type }));
	form.set('source', 'phone');
	if (entry.routeId.startsWith('/api/runs')) form.set('stepId', 'power-on-as-received');
	return call(entry, w, { jar, body: form, contentType: 'multipart' });
}

async function count() {
	return (await (await getDb()).select({ id: attachments.id }).from(attachments)).length;
}

async function newest() {
	const rows = await (await getDb()).select().from(attachments);
	return rows.sort((a, b) => +b.createdAt - +a.createdAt)[0];
}

const refusals: [string, () => Promise<{ bytes: Uint8Array; name: string; type: string }[]>, number][] = [
	[
		'a text file named photo.jpg',
		async () => [{ bytes: enc('just some text, not a picture'), name: 'photo.jpg', type: 'image/jpeg' }],
		415
	],
	[
		'a PDF named board.png',
		async () => [{ bytes: enc('%PDF-1.7\n1 0 obj<<>>endobj\n%%EOF'), name: 'board.png', type: 'image/png' }],
		415
	],
	[
		'an HTML page named x.webp',
		async () => [
			{ bytes: enc('<!doctype html><script>alert(1)</script>'), name: 'x.webp', type: 'image/webp' }
		],
		415
	],
	[
		'an SVG with a script named lid.png',
		async () => [
			{
				bytes: enc(
					'<svg xmlns="http://www.w3.org/2000/svg" onload="alert(1)"><script>alert(2)</script></svg>'
				),
				name: 'lid.png',
				type: 'image/png'
			}
		],
		415
	],
	[
		'a GIF/JavaScript polyglot',
		async () => [
			{
				bytes: enc('GIF89a/*\x01\x00\x01\x00\x00\x00\x00*/=alert(1);//'),
				name: 'poly.jpg',
				type: 'image/jpeg'
			}
		],
		415
	],
	['a HEIC header', async () => [{ bytes: heicHeader(), name: 'phone.heic', type: 'image/heic' }], 415],
	[
		'a decompression bomb (a PNG claiming 100 000 × 100 000 pixels)',
		async () => [{ bytes: pngClaiming(100_000, 100_000), name: 'bomb.png', type: 'image/png' }],
		422
	],
	[
		'a truncated JPEG',
		async () => {
			const j = await jpegWithGps();
			return [{ bytes: j.slice(0, Math.floor(j.length / 2)), name: 'cut.jpg', type: 'image/jpeg' }];
		},
		422
	],
	['an empty file', async () => [{ bytes: new Uint8Array(), name: 'empty.jpg', type: 'image/jpeg' }], 415],
	[
		'thirty files in one request',
		async () =>
			Promise.all(
				Array.from({ length: 30 }, async (_, i) => ({
					bytes: await png(64 + 2 * i, 48),
					name: `p${i}.png`,
					type: 'image/png'
				}))
			),
		400
	]
];

describe.each(uploadRoutes.map((e) => [e.key] as const))('hostile uploads to %s', (routeKey) => {
	it.each(refusals.map(([what, make, status]) => [what, make, status] as const))(
		'refuses %s and stores nothing',
		async (_what, make, status) => {
			const before = await count();
			const o = await send(routeKey, await make());
			expect(o.status).toBe(status);
			expect(await count()).toBe(before);
		}
	);

	it('stores a PNG with an HTML/ZIP tail re-encoded: the tail is gone', async () => {
		const tail = concat(enc('<html><script>window.__xss=1</script></html>'), enc('PK\x03\x04payload.txt'));
		const o = await send(routeKey, [
			{ bytes: concat(await png(120, 90), tail), name: 'polyglot.png', type: 'text/html' }
		]);
		expect(o.status).toBe(201);
		const row = await newest();
		expect(row.mime).toBe('image/png'); // what it is, not what the sender said
		for (const key of [row.originalKey, row.displayKey, row.thumbKey]) {
			const stored = Buffer.from((await getStore().get(key))!);
			expect(stored.includes('<script>')).toBe(false);
			expect(stored.includes('PK\x03\x04')).toBe(false);
		}
	});

	it('stores a JPEG carrying GPS without any location, and a path-traversal name changes nothing', async () => {
		const o = await send(routeKey, [
			{ bytes: await jpegWithGps(), name: '../../../../etc/passwd\u0000.jpg', type: 'image/jpeg' }
		]);
		expect(o.status).toBeLessThan(300);
		const row = await newest();
		for (const key of [row.originalKey, row.displayKey, row.thumbKey]) {
			expect(key).not.toMatch(/\.\.|passwd|[\\/]{2}/);
			const stored = (await getStore().get(key))!;
			expect(await exifr.gps(stored).catch(() => undefined)).toBeUndefined();
			const meta = await sharp(stored).metadata();
			expect([meta.exif, meta.xmp]).toEqual([undefined, undefined]);
		}
		expect(JSON.stringify(row)).not.toContain('passwd');
	});
});

it('finds both upload routes', async () => {
	expect(uploadRoutes.map((e) => e.key).sort()).toEqual([
		'/api/jobs/[id]/photos POST',
		'/api/runs/[id]/photos POST'
	]);
	expect(
		(await (await getDb()).select().from(attachments).where(eq(attachments.jobId, w.jobId))).length
	).toBeGreaterThan(0);
});
