import { render, screen, waitFor } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { PhotoDto } from '$lib/photos/limits';
import { photoDto, stubInstantUploads } from '$lib/photos/fixtures';
import PhotoSection from './PhotoSection.svelte';

const photo = photoDto;

/** Answers every upload at once with the next photo. */
const stubUploads = (next: PhotoDto) => stubInstantUploads(() => next);

afterEach(() => vi.unstubAllGlobals());

describe('PhotoSection', () => {
	it('adds an uploaded photo to the grid at once and tells the parent', async () => {
		stubUploads(photo('new', { caption: 'Fresh from the bench' }));
		const onuploaded = vi.fn();
		render(PhotoSection, {
			uploadUrl: '/api/jobs/j/photos',
			photos: [photo('old')],
			user: { id: 'me', role: 'technician' },
			onuploaded
		});
		await userEvent.upload(
			screen.getByTestId('photo-file-input'),
			new File([new Uint8Array(10)], 'a.jpg', { type: 'image/jpeg' })
		);
		await waitFor(() => expect(screen.getAllByTestId('photo-tile')).toHaveLength(2));
		expect(screen.getAllByTestId('photo-tile')[1]).toHaveTextContent('Fresh from the bench');
		expect(onuploaded).toHaveBeenCalledWith(expect.objectContaining({ id: 'new' }));
	});

	it('removes a photo through DELETE /api/photos/:id, only offering it for the uploader’s own', async () => {
		const fetchMock = vi.fn().mockResolvedValue(new Response(null, { status: 204 }));
		vi.stubGlobal('fetch', fetchMock);
		const onremoved = vi.fn();
		render(PhotoSection, {
			uploadUrl: '/api/jobs/j/photos',
			photos: [photo('mine'), photo('theirs', { uploadedBy: 'someone-else' })],
			user: { id: 'me', role: 'technician' },
			onremoved
		});
		await userEvent.click(screen.getByRole('button', { name: /enlarge: photo theirs/i }));
		expect(screen.queryByRole('button', { name: 'Remove' })).not.toBeInTheDocument();
		await userEvent.keyboard('{Escape}');
		await userEvent.click(screen.getByRole('button', { name: /enlarge: photo mine/i }));
		await userEvent.click(screen.getByRole('button', { name: 'Remove' }));
		await userEvent.click(screen.getByRole('button', { name: 'Yes, remove' }));
		expect(fetchMock).toHaveBeenCalledWith('/api/photos/mine', { method: 'DELETE' });
		await waitFor(() => expect(screen.getAllByTestId('photo-tile')).toHaveLength(1));
		expect(onremoved).toHaveBeenCalledWith(expect.objectContaining({ id: 'mine' }));
	});

	it('lets a senior remove anyone’s photo', async () => {
		render(PhotoSection, {
			uploadUrl: '/api/jobs/j/photos',
			photos: [photo('theirs', { uploadedBy: 'someone-else' })],
			user: { id: 'me', role: 'senior' }
		});
		await userEvent.click(screen.getByRole('button', { name: /enlarge/i }));
		expect(screen.getByRole('button', { name: 'Remove' })).toBeInTheDocument();
	});
});
