import exifr from 'exifr';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { MAX_PHOTO_BYTES } from '$lib/photos/limits';
import { heicSupported, processPhoto } from './process';
import { RuleError } from '$lib/server/errors';
import { gpsExif, halves, heicHeader, jpegWithGps, png, pngClaiming } from './fixtures';

async function rejection(bytes: Uint8Array, opts?: Parameters<typeof processPhoto>[1]) {
	const e = await processPhoto(bytes, opts).then(
		() => null,
		(err: unknown) => err
	);
	expect(e).toBeInstanceOf(RuleError);
	return e as RuleError;
}

/** The red/green/blue of one pixel. */
async function pixel(bytes: Uint8Array, x: number, y: number) {
	const { data, info } = await sharp(bytes).raw().toBuffer({ resolveWithObject: true });
	const i = (y * info.width + x) * info.channels;
	return [data[i], data[i + 1], data[i + 2]];
}

describe('metadata removal', () => {
	it('the fixture really carries GPS, camera EXIF and XMP (read by exifr, an independent reader)', async () => {
		const input = await jpegWithGps();
		const gps = await exifr.gps(input);
		expect(gps?.latitude).toBeCloseTo(51.5, 6); // 51° 30′ N
		expect(gps?.longitude).toBeCloseTo(-(7 / 60), 6); // 0° 7′ W
		const tags = await exifr.parse(input, { xmp: true, tiff: true });
		expect(tags).toMatchObject({ Make: gpsExif.IFD0.Make, Model: gpsExif.IFD0.Model });
		expect((await sharp(input).metadata()).orientation).toBe(6);
	});

	it('keeps no EXIF, GPS, XMP, IPTC or ICC block in any stored variant', async () => {
		const out = await processPhoto(await jpegWithGps());
		expect(out.original.mime).toBe('image/jpeg');
		// exifr finds nothing at all in the stored JPEG (undefined = no metadata segment found).
		expect(await exifr.parse(out.original.bytes, true)).toBeUndefined();
		expect(await exifr.gps(out.original.bytes)).toBeUndefined();
		for (const v of [out.original, out.display, out.thumb]) {
			const meta = await sharp(v.bytes).metadata();
			expect(meta).not.toHaveProperty('exif');
			expect(meta).not.toHaveProperty('xmp');
			expect(meta).not.toHaveProperty('iptc');
			expect(meta).not.toHaveProperty('icc');
			expect(meta.orientation).toBeUndefined();
			// Not even the coordinates as text anywhere in the file.
			expect(Buffer.from(v.bytes).includes('GPSLatitude')).toBe(false);
			expect(Buffer.from(v.bytes).includes('Corvana')).toBe(false);
		}
	});

	it('turns the pixels upright per EXIF orientation 6 before dropping the tag', async () => {
		// EXIF 2.3 (CIPA DC-008), Orientation = 6: the stored image must be rotated 90° clockwise to
		// view, so the 400 × 300 picture becomes 300 × 400 and its left (red) half comes out on top.
		const out = await processPhoto(await jpegWithGps());
		expect([out.original.width, out.original.height]).toEqual([300, 400]);
		const [r1, , b1] = await pixel(out.original.bytes, 150, 50);
		const [r2, , b2] = await pixel(out.original.bytes, 150, 350);
		expect(r1).toBeGreaterThan(180);
		expect(b1).toBeLessThan(80);
		expect(b2).toBeGreaterThan(180);
		expect(r2).toBeLessThan(80);
	});

	it('converts a wide-gamut (Display P3) photo to sRGB and drops the profile', async () => {
		const p3 = new Uint8Array(await (await halves(40, 20)).withIccProfile('p3').jpeg().toBuffer());
		expect((await sharp(p3).metadata()).icc).toBeDefined();
		const out = await processPhoto(p3);
		expect((await sharp(out.original.bytes).metadata()).icc).toBeUndefined();
		expect((await sharp(out.original.bytes).metadata()).space).toBe('srgb');
	});
});

describe('sizes', () => {
	it('makes a 2048 px display and a 480 px thumbnail, both WebP, keeping the aspect ratio', async () => {
		const big = new Uint8Array(await (await halves(3000, 2000)).jpeg().toBuffer());
		const out = await processPhoto(big);
		expect([out.original.width, out.original.height]).toEqual([3000, 2000]);
		// 2000 × 2048 / 3000 = 1365.3 → 1365; 2000 × 480 / 3000 = 320.
		expect([out.display.width, out.display.height, out.display.mime]).toEqual([2048, 1365, 'image/webp']);
		expect([out.thumb.width, out.thumb.height, out.thumb.mime]).toEqual([480, 320, 'image/webp']);
		expect((await sharp(out.thumb.bytes).metadata()).format).toBe('webp');
	});

	it('never enlarges a small image', async () => {
		const out = await processPhoto(await png(64, 48));
		expect([out.display.width, out.display.height]).toEqual([64, 48]);
		expect([out.thumb.width, out.thumb.height]).toEqual([64, 48]);
	});
});

describe('type sniffing', () => {
	it('takes the type from the bytes: PNG stays PNG, WebP stays WebP', async () => {
		expect((await processPhoto(await png())).original.mime).toBe('image/png');
		const webp = new Uint8Array(await (await halves(32, 32)).webp().toBuffer());
		expect((await processPhoto(webp)).original.mime).toBe('image/webp');
	});

	it('refuses text, whatever it is called', async () => {
		const e = await rejection(new TextEncoder().encode('this is not a photo, just text\n'.repeat(20)));
		expect([e.code, e.status]).toEqual(['not-an-image', 415]);
		expect(e.message).toMatch(/not an image/);
	});

	it('refuses a PDF, naming what it is', async () => {
		const pdf = new TextEncoder().encode('%PDF-1.7\n1 0 obj\n<<>>\nendobj\ntrailer\n<<>>\n%%EOF\n');
		const e = await rejection(pdf);
		expect(e.code).toBe('not-an-image');
		expect(e.message).toMatch(/PDF/);
	});

	it('refuses GIF and AVIF images as unsupported types, listing what is accepted', async () => {
		const gif = new Uint8Array(await (await halves(16, 16)).gif().toBuffer());
		const avif = new Uint8Array(await (await halves(16, 16)).avif().toBuffer());
		for (const bytes of [gif, avif]) {
			const e = await rejection(bytes);
			expect([e.code, e.status]).toEqual(['unsupported-type', 415]);
			expect(e.message).toMatch(/JPEG, PNG or WebP/);
		}
	});

	it('refuses HEIC with a way out: this sharp build has no HEVC decoder', async () => {
		// sharp's prebuilt libvips ships libheif with the AV1 codec only: format.heif lists `.avif`.
		expect(heicSupported).toBe(false);
		const e = await rejection(heicHeader());
		expect([e.code, e.status]).toEqual(['unsupported-type', 415]);
		expect(e.message).toMatch(/HEIC.*JPEG/);
	});
});

describe('damaged and oversized files', () => {
	it('refuses a truncated JPEG as damaged', async () => {
		const whole = await jpegWithGps();
		const e = await rejection(whole.subarray(0, Math.floor(whole.byteLength * 0.6)));
		expect([e.code, e.status]).toEqual(['corrupt', 422]);
		expect(e.message).toMatch(/damaged or incomplete/);
	});

	it('refuses a file with a JPEG signature and garbage after it', async () => {
		const junk = new Uint8Array(2000).fill(0x41);
		junk.set([0xff, 0xd8, 0xff, 0xe0], 0);
		const e = await rejection(junk);
		expect(e.code).toBe('corrupt');
	});

	it('refuses a tiny file claiming 50 000 × 50 000 pixels before decoding it', async () => {
		const bomb = pngClaiming(50_000, 50_000);
		expect(bomb.byteLength).toBeLessThan(200);
		const e = await rejection(bomb);
		expect([e.code, e.status]).toEqual(['too-many-pixels', 422]);
		expect(e.message).toMatch(/100 megapixels/);
	});

	it('applies the pixel limit it is given', async () => {
		const e = await rejection(await png(64, 48), { maxPixels: 64 * 48 - 1 });
		expect(e.code).toBe('too-many-pixels');
		await expect(processPhoto(await png(64, 48), { maxPixels: 64 * 48 })).resolves.toBeTruthy();
	});

	it('refuses more than 15 MiB before looking inside, and an empty file', async () => {
		expect(MAX_PHOTO_BYTES).toBe(15 * 1024 * 1024);
		const tooBig = new Uint8Array(MAX_PHOTO_BYTES + 1);
		const e = await rejection(tooBig);
		expect([e.code, e.status]).toEqual(['too-big', 413]);
		expect(e.message).toMatch(/15\.0 MB/);
		// Exactly at the limit is allowed past the size check (and then refused for its content).
		expect((await rejection(new Uint8Array(MAX_PHOTO_BYTES))).code).not.toBe('too-big');
		expect((await rejection(new Uint8Array(0))).code).toBe('empty');
	});
});
