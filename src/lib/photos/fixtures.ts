// Test helpers of the photo component specs (not imported by the app): a stored photo as the API
// answers it, and an XMLHttpRequest stand-in that answers every upload at once.
import { vi } from 'vitest';
import type { PhotoDto } from './limits';

/** A job photo by "me" (Mira Saltmarsh, an invented technician); `over` changes any field. */
export const photoDto = (id: string, over: Partial<PhotoDto> = {}): PhotoDto => ({
	id,
	jobId: 'j',
	runId: null,
	stepId: null,
	source: 'phone',
	caption: `Photo ${id}`,
	mime: 'image/jpeg',
	width: 400,
	height: 300,
	bytes: 1000,
	uploadedBy: 'me',
	uploadedByName: 'Mira Saltmarsh',
	createdAt: '2026-01-05T09:30:00Z',
	shownToCustomer: false,
	thumbUrl: `/photos/${id}/thumb`,
	displayUrl: `/photos/${id}/display`,
	originalUrl: `/photos/${id}/original`,
	...over
});

/**
 * Stubs XMLHttpRequest so that every upload succeeds at once (201) with the photo `answer` gives
 * for the form sent. Returns the forms sent, in order. Undo with `vi.unstubAllGlobals()`.
 */
export function stubInstantUploads(answer: (body: FormData) => PhotoDto): FormData[] {
	const sent: FormData[] = [];
	class InstantXhr {
		status = 0;
		responseText = '';
		upload = { onprogress: null };
		onload: (() => void) | null = null;
		onerror: (() => void) | null = null;
		open() {}
		setRequestHeader() {}
		send(body: FormData) {
			sent.push(body);
			this.status = 201;
			this.responseText = JSON.stringify({ photo: answer(body), duplicate: false });
			queueMicrotask(() => this.onload?.());
		}
	}
	vi.stubGlobal('XMLHttpRequest', InstantXhr);
	return sent;
}
