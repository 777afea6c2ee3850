// Shared by the upload form (to warn before sending) and the server (which decides). Isomorphic.

/**
 * Largest photo accepted: 15 MiB. A phone camera's full-resolution JPEG is typically 2–8 MB and a
 * microscope camera's far less; the margin covers high-resolution modes without letting one upload
 * tie up the server. adapter-node's BODY_SIZE_LIMIT must be above this (20M under `npm start`).
 */
export const MAX_PHOTO_BYTES = 15 * 1024 * 1024;

/**
 * Largest decoded image accepted: 100 megapixels (e.g. 12 000 × 8 333). Decoding needs about three
 * bytes a pixel, so this caps one upload near 300 MB of memory; a small file that claims a huge
 * canvas (a "decompression bomb") is refused from its header, before any pixel is decoded.
 */
export const MAX_PHOTO_PIXELS = 100_000_000;

/** Longest side of the stored thumbnail (grid) and display (zoom) sizes, in pixels. */
export const THUMB_MAX_PX = 480;
export const DISPLAY_MAX_PX = 2048;

export const photoSources = ['phone', 'microscope'] as const;
export type PhotoSource = (typeof photoSources)[number];
export const photoSourceLabels: Record<PhotoSource, string> = {
	phone: 'Phone camera',
	microscope: 'Microscope camera'
};

export const photoSizes = ['thumb', 'display', 'original'] as const;
export type PhotoSize = (typeof photoSizes)[number];

export const MAX_CAPTION_LENGTH = 500;

/** What a refusal is about; the message says it in words, the code lets a client react. */
export type PhotoRejectionCode =
	'empty' | 'too-big' | 'not-an-image' | 'unsupported-type' | 'too-many-pixels' | 'corrupt';

/** A stored photo as the API returns it and the grid shows it. */
export type PhotoDto = {
	id: string;
	jobId: string;
	runId: string | null;
	stepId: string | null;
	source: PhotoSource;
	caption: string;
	mime: string;
	width: number;
	height: number;
	bytes: number;
	uploadedBy: string | null;
	uploadedByName: string | null;
	createdAt: string;
	shownToCustomer: boolean;
	thumbUrl: string;
	displayUrl: string;
	originalUrl: string;
};

export function photoUrl(id: string, size: PhotoSize) {
	return `/photos/${id}/${size}`;
}

export function formatBytes(n: number) {
	if (n < 1024) return `${n} B`;
	if (n < 1024 * 1024) return `${(n / 1024).toFixed(0)} KB`;
	return `${(n / (1024 * 1024)).toFixed(1)} MB`;
}
