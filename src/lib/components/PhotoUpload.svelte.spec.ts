import { render, screen, waitFor, fireEvent } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { MAX_PHOTO_BYTES, type PhotoDto } from '$lib/photos/limits';
import { photoDto } from '$lib/photos/fixtures';
import PhotoUpload from './PhotoUpload.svelte';

/** Stands in for the browser's XMLHttpRequest; each test answers the requests it expects. */
class FakeXhr {
	static sent: FakeXhr[] = [];
	method = '';
	url = '';
	body: FormData | null = null;
	status = 0;
	responseText = '';
	upload: { onprogress: ((e: { lengthComputable: boolean; loaded: number; total: number }) => void) | null } =
		{ onprogress: null };
	onload: (() => void) | null = null;
	onerror: (() => void) | null = null;
	open(method: string, url: string) {
		this.method = method;
		this.url = url;
	}
	setRequestHeader() {}
	send(body: FormData) {
		this.body = body;
		FakeXhr.sent.push(this);
	}
	progress(loaded: number, total: number) {
		this.upload.onprogress?.({ lengthComputable: true, loaded, total });
	}
	respond(status: number, body: unknown) {
		this.status = status;
		this.responseText = JSON.stringify(body);
		this.onload?.();
	}
}

const photo = (over: Partial<PhotoDto> = {}) =>
	photoDto('11111111-1111-4111-8111-111111111111', {
		caption: '',
		uploadedBy: 'u',
		thumbUrl: '/photos/x/thumb',
		displayUrl: '/photos/x/display',
		originalUrl: '/photos/x/original',
		...over
	});

const jpeg = (name = 'board.jpg', size = 1000) =>
	new File([new Uint8Array(size)], name, { type: 'image/jpeg' });

beforeEach(() => {
	FakeXhr.sent = [];
	vi.stubGlobal('XMLHttpRequest', FakeXhr);
});
afterEach(() => vi.unstubAllGlobals());

describe('PhotoUpload', () => {
	it('offers the camera (capture hint) and a multi-file picker, both for images only', () => {
		render(PhotoUpload, { url: '/api/jobs/j/photos' });
		const camera = screen.getByTestId('photo-camera-input');
		expect(camera).toHaveAttribute('accept', 'image/*');
		expect(camera).toHaveAttribute('capture', 'environment');
		const files = screen.getByTestId('photo-file-input');
		expect(files).toHaveAttribute('accept', 'image/*');
		expect(files).toHaveAttribute('multiple');
		expect(screen.getByText(/up to 15\.0 MB each/)).toBeInTheDocument();
	});

	it('opens the pickers from real buttons, so keyboard and touch both work', async () => {
		render(PhotoUpload, { url: '/api/jobs/j/photos' });
		const click = vi.spyOn(HTMLInputElement.prototype, 'click').mockImplementation(() => {});
		await userEvent.tab(); // the first source radio
		await userEvent.tab(); // the caption field
		await userEvent.tab();
		expect(screen.getByRole('button', { name: /take a photo/i })).toHaveFocus();
		await userEvent.keyboard('{Enter}');
		expect(click).toHaveBeenCalledTimes(1);
		await userEvent.click(screen.getByRole('button', { name: /choose photos/i }));
		expect(click).toHaveBeenCalledTimes(2);
		click.mockRestore();
	});

	it('sends the file with the source, caption and extra fields, shows progress, then reports the photo', async () => {
		const onuploaded = vi.fn();
		render(PhotoUpload, { url: '/api/runs/r/photos', fields: { stepId: 'open-and-disconnect' }, onuploaded });
		await userEvent.click(screen.getByLabelText('Microscope camera'));
		await userEvent.type(screen.getByLabelText(/caption/i), 'Green residue near the connector');
		await userEvent.upload(screen.getByTestId('photo-file-input'), jpeg());

		expect(FakeXhr.sent).toHaveLength(1);
		const xhr = FakeXhr.sent[0];
		expect([xhr.method, xhr.url]).toEqual(['POST', '/api/runs/r/photos']);
		expect((xhr.body!.get('file') as File).name).toBe('board.jpg');
		expect(xhr.body!.get('source')).toBe('microscope');
		expect(xhr.body!.get('caption')).toBe('Green residue near the connector');
		expect(xhr.body!.get('stepId')).toBe('open-and-disconnect');

		xhr.progress(40, 100);
		await waitFor(() => expect(screen.getByLabelText('Uploading board.jpg')).toHaveAttribute('value', '40'));
		xhr.respond(201, { photo: photo(), duplicate: false });
		await waitFor(() => expect(screen.getByText('Uploaded.')).toBeInTheDocument());
		expect(onuploaded).toHaveBeenCalledWith(photo(), false);
	});

	it('shows the server’s reason beside the file it refused, and goes on with the next file', async () => {
		render(PhotoUpload, { url: '/api/jobs/j/photos' });
		await userEvent.upload(screen.getByTestId('photo-file-input'), [jpeg('notes.jpg'), jpeg('good.jpg')]);
		FakeXhr.sent[0].respond(415, {
			message: 'This file is not an image, whatever its name says.',
			code: 'not-an-image'
		});
		const alert = await screen.findByRole('alert');
		expect(alert).toHaveTextContent('This file is not an image, whatever its name says.');
		await waitFor(() => expect(FakeXhr.sent).toHaveLength(2));
		expect((FakeXhr.sent[1].body!.get('file') as File).name).toBe('good.jpg');
		const items = screen.getAllByTestId('upload-item');
		expect(items[0]).toHaveAttribute('data-state', 'failed');
		expect(items[1]).toHaveAttribute('data-state', 'uploading');
	});

	it('refuses a file over 15 MiB at once, without sending it', async () => {
		render(PhotoUpload, { url: '/api/jobs/j/photos' });
		const big = jpeg('huge.jpg');
		Object.defineProperty(big, 'size', { value: MAX_PHOTO_BYTES + 1 });
		await userEvent.upload(screen.getByTestId('photo-file-input'), big);
		expect(await screen.findByRole('alert')).toHaveTextContent(/over the 15\.0 MB limit/);
		expect(FakeXhr.sent).toHaveLength(0);
	});

	it('takes files dropped on the drop zone', async () => {
		render(PhotoUpload, { url: '/api/jobs/j/photos' });
		const zone = screen.getByTestId('photo-drop-zone');
		await fireEvent.dragOver(zone, { dataTransfer: { files: [] } });
		expect(zone.className).toMatch(/border-accent/);
		await fireEvent.drop(zone, { dataTransfer: { files: [jpeg('dropped.jpg')] } });
		expect(FakeXhr.sent).toHaveLength(1);
		expect((FakeXhr.sent[0].body!.get('file') as File).name).toBe('dropped.jpg');
		expect(zone.className).not.toMatch(/border-accent/);
	});

	it('says when the connection failed', async () => {
		render(PhotoUpload, { url: '/api/jobs/j/photos' });
		await userEvent.upload(screen.getByTestId('photo-file-input'), jpeg());
		FakeXhr.sent[0].onerror?.();
		expect(await screen.findByRole('alert')).toHaveTextContent(/did not reach the server/);
	});

	it('without a connection keeps a photo on the device through `queue`, after the size check', async () => {
		vi.stubGlobal('navigator', { ...navigator, onLine: false });
		const queue = vi.fn().mockResolvedValue(true);
		render(PhotoUpload, { url: '/api/runs/r/photos', queue });
		await userEvent.upload(screen.getByTestId('photo-file-input'), [
			jpeg('board.jpg'),
			jpeg('huge.jpg', MAX_PHOTO_BYTES + 1)
		]);
		await waitFor(() => expect(queue).toHaveBeenCalledOnce());
		expect(queue.mock.calls[0][0].name).toBe('board.jpg');
		expect(FakeXhr.sent).toHaveLength(0);
		const items = screen.getAllByTestId('upload-item');
		expect(items[0]).toHaveAttribute('data-state', 'queued');
		expect(items[0]).toHaveTextContent('Waiting to upload');
		expect(items[1]).toHaveAttribute('data-state', 'failed'); // over the limit: never queued
		expect(items[1]).toHaveTextContent(/over the 15\.0 MB limit/);
	});

	it('a lost connection mid-upload hands the photo to `queue` instead of failing', async () => {
		const queue = vi.fn().mockResolvedValue(true);
		render(PhotoUpload, { url: '/api/runs/r/photos', queue });
		await userEvent.upload(screen.getByTestId('photo-file-input'), jpeg());
		FakeXhr.sent[0].onerror?.();
		await waitFor(() => expect(queue).toHaveBeenCalledOnce());
		expect(screen.getByTestId('upload-item')).toHaveAttribute('data-state', 'queued');
	});
});
