import { render, screen, waitFor } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { photoDto, stubInstantUploads } from '$lib/photos/fixtures';
import RunStepPhotos from './RunStepPhotos.svelte';

const photo = (id: string, stepId: string) => photoDto(id, { runId: 'r', stepId, source: 'microscope' });

afterEach(() => vi.unstubAllGlobals());

describe('RunStepPhotos', () => {
	it('shows only the current step’s photos and files uploads under that step', async () => {
		const sent = stubInstantUploads((body) => ({
			...photo('new', String(body.get('stepId'))),
			caption: 'Taken just now'
		}));
		const user = { id: 'me', role: 'technician' as const };
		const photos = [photo('a', 'power-on-as-received'), photo('b', 'open-and-disconnect')];
		const { rerender } = render(RunStepPhotos, { runId: 'r', stepId: 'open-and-disconnect', photos, user });
		expect(screen.getAllByTestId('photo-tile')).toHaveLength(1);
		expect(screen.getByTestId('photo-tile')).toHaveTextContent('Photo b');

		await userEvent.upload(
			screen.getByTestId('photo-file-input'),
			new File([new Uint8Array(8)], 'x.jpg', { type: 'image/jpeg' })
		);
		expect(sent.at(-1)!.get('stepId')).toBe('open-and-disconnect');
		await waitFor(() => expect(screen.getAllByTestId('photo-tile')).toHaveLength(2));

		// Back to the first step and forward again: each step keeps its own photos.
		await rerender({ runId: 'r', stepId: 'power-on-as-received', photos, user });
		expect(screen.getAllByTestId('photo-tile').map((t) => t.textContent)).toEqual([
			expect.stringContaining('Photo a')
		]);
		await rerender({ runId: 'r', stepId: 'open-and-disconnect', photos, user });
		expect(screen.getAllByTestId('photo-tile')).toHaveLength(2);
	});
});
