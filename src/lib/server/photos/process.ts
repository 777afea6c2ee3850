import crypto from 'node:crypto';
import { fileTypeFromBuffer } from 'file-type';
import sharp, { type Metadata, type Sharp } from 'sharp';
import {
	DISPLAY_MAX_PX,
	MAX_PHOTO_BYTES,
	MAX_PHOTO_PIXELS,
	THUMB_MAX_PX,
	formatBytes,
	type PhotoRejectionCode
} from '$lib/photos/limits';
import { RuleError } from '$lib/server/errors';

/**
 * A file that is not stored, with the reason in words for the person who chose it: 413 for size,
 * 422 for a file that claims to be an image but is not readable, 415 for the type.
 */
export function photoRejected(code: PhotoRejectionCode, message: string) {
	const status = code === 'too-big' ? 413 : code === 'corrupt' || code === 'too-many-pixels' ? 422 : 415;
	return new RuleError(status, code, message);
}

/**
 * HEIC (HEVC-coded HEIF, the default of many phone cameras) is read only when this machine's
 * libvips can decode HEVC. sharp's prebuilt binaries ship libheif with the AV1 codec only (for
 * AVIF; HEVC is patent-encumbered), so on a stock install `fileSuffix` lists just `.avif` and HEIC
 * is refused with a clear reason. A sharp built against a system libvips with HEVC support lists
 * `.heic` and is then used.
 */
export const heicSupported: boolean =
	(sharp.format.heif?.input as { fileSuffix?: string[] } | undefined)?.fileSuffix?.includes('.heic') ?? false;

type Kind = 'jpeg' | 'png' | 'webp' | 'heic';
// Keyed by the MIME type file-type reports from the bytes (never the name or the declared type).
const kinds: Record<string, Kind> = {
	'image/jpeg': 'jpeg',
	'image/png': 'png',
	'image/apng': 'png', // an animated PNG: its first frame, stored as a still PNG
	'image/webp': 'webp',
	'image/heic': 'heic',
	'image/heif': 'heic',
	'image/heic-sequence': 'heic',
	'image/heif-sequence': 'heic'
};

export const acceptedTypesText = heicSupported ? 'JPEG, PNG, WebP or HEIC' : 'JPEG, PNG or WebP';

export type StoredVariant = { bytes: Uint8Array; mime: string; width: number; height: number };

export type ProcessedPhoto = {
	/** SHA-256 of the bytes as uploaded (metadata included), to recognise the same upload again. */
	uploadSha256: string;
	uploadBytes: number;
	/** Full resolution, upright, every metadata block removed; same format as uploaded (HEIC → JPEG). */
	original: StoredVariant;
	/** WebP, longest side DISPLAY_MAX_PX: what the zoom dialog shows. */
	display: StoredVariant;
	/** WebP, longest side THUMB_MAX_PX: what the grid shows. */
	thumb: StoredVariant;
};

/**
 * Checks an upload and turns it into the three stored variants. Every variant is re-encoded from
 * decoded pixels, which is what removes EXIF (GPS, camera serials, times), XMP, IPTC and comments:
 * sharp writes no metadata unless asked to. Pixels are first turned upright per the EXIF
 * orientation (which is then gone) and converted to sRGB from any embedded ICC profile.
 */
export async function processPhoto(
	upload: Uint8Array,
	opts: { maxBytes?: number; maxPixels?: number } = {}
): Promise<ProcessedPhoto> {
	const maxBytes = opts.maxBytes ?? MAX_PHOTO_BYTES;
	const maxPixels = opts.maxPixels ?? MAX_PHOTO_PIXELS;
	if (upload.byteLength === 0) throw photoRejected('empty', 'The file is empty.');
	if (upload.byteLength > maxBytes) {
		throw photoRejected(
			'too-big',
			`The file is ${formatBytes(upload.byteLength)}; photos may be at most ${formatBytes(maxBytes)}. ` +
				'Take it at a lower resolution or export a smaller copy.'
		);
	}

	const sniffed = await fileTypeFromBuffer(upload);
	const kind = sniffed ? kinds[sniffed.mime] : undefined;
	if (!sniffed || !sniffed.mime.startsWith('image/')) {
		throw photoRejected(
			'not-an-image',
			`This file is not an image${sniffed ? ` (its content is ${sniffed.ext.toUpperCase()})` : ''}, whatever its name says. Photos must be ${acceptedTypesText}.`
		);
	}
	if (kind === 'heic' && !heicSupported) {
		throw photoRejected(
			'unsupported-type',
			'HEIC photos cannot be read on this server. Set the camera to save JPEG ("most compatible") or share the photo as JPEG, then upload again.'
		);
	}
	if (!kind) {
		throw photoRejected(
			'unsupported-type',
			`${sniffed.ext.toUpperCase()} images are not accepted. Photos must be ${acceptedTypesText}.`
		);
	}

	// failOn 'error': truncated or damaged pixel data is refused rather than stored half-grey.
	const input = sharp(upload, { failOn: 'error', limitInputPixels: maxPixels });
	let meta: Metadata;
	try {
		meta = await input.metadata();
	} catch (e) {
		throw decodeFailure(e, maxPixels);
	}
	if (!meta.width || !meta.height)
		throw photoRejected('corrupt', 'The image has no size; it cannot be read.');

	// Each variant is its own pipeline from the upload (libvips then shrinks JPEGs while decoding,
	// which is faster than resizing decoded pixels); effort 2 keeps WebP encoding near 0.5 s.
	const upright = input.clone().rotate().toColourspace('srgb');
	try {
		const original =
			kind === 'png'
				? await encode(upright.clone().png(), 'image/png')
				: kind === 'webp'
					? await encode(upright.clone().webp({ quality: 92 }), 'image/webp')
					: await encode(upright.clone().jpeg({ quality: 92 }), 'image/jpeg');
		const [display, thumb] = await Promise.all([
			encode(fit(upright.clone(), DISPLAY_MAX_PX).webp({ quality: 82, effort: 2 }), 'image/webp'),
			encode(fit(upright.clone(), THUMB_MAX_PX).webp({ quality: 75 }), 'image/webp')
		]);
		return {
			uploadSha256: crypto.createHash('sha256').update(upload).digest('hex'),
			uploadBytes: upload.byteLength,
			original,
			display,
			thumb
		};
	} catch (e) {
		throw decodeFailure(e, maxPixels);
	}
}

function fit(img: Sharp, px: number) {
	return img.resize({ width: px, height: px, fit: 'inside', withoutEnlargement: true });
}

async function encode(img: Sharp, mime: string): Promise<StoredVariant> {
	const { data, info } = await img.toBuffer({ resolveWithObject: true });
	return {
		bytes: new Uint8Array(data.buffer, data.byteOffset, data.byteLength),
		mime,
		width: info.width,
		height: info.height
	};
}

function decodeFailure(e: unknown, maxPixels: number) {
	const message = e instanceof Error ? e.message : String(e);
	if (/pixel limit/i.test(message)) {
		return photoRejected(
			'too-many-pixels',
			`The image is larger than ${Math.round(maxPixels / 1_000_000)} megapixels; export a smaller copy and upload that.`
		);
	}
	return photoRejected(
		'corrupt',
		'The image is damaged or incomplete and cannot be read (the upload may have been cut off). Try the original file again.'
	);
}
