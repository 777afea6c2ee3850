import { render, screen, waitFor, within } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import type { PhotoDto } from '$lib/photos/limits';
import { photoDto } from '$lib/photos/fixtures';
import PhotoGrid from './PhotoGrid.svelte';

const photo = (id: string, over: Partial<PhotoDto> = {}) =>
	photoDto(id, { caption: '', bytes: 250_000, uploadedBy: 'u1', ...over });

const two = [
	photo('a', { caption: 'Indicator turned pink', source: 'phone' }),
	photo('b', { caption: 'Corrosion at the flex connector', source: 'microscope' })
];

describe('PhotoGrid', () => {
	it('says what to do when there are no photos', () => {
		render(PhotoGrid, { photos: [], emptyText: 'No photos yet. Add one below.' });
		expect(screen.getByText('No photos yet. Add one below.')).toBeInTheDocument();
		expect(screen.queryByRole('list')).not.toBeInTheDocument();
	});

	it('shows each thumbnail with its caption and source in words', () => {
		render(PhotoGrid, { photos: two });
		const imgs = screen.getAllByRole('img');
		expect(imgs.map((i) => i.getAttribute('src'))).toEqual(['/photos/a/thumb', '/photos/b/thumb']);
		expect(imgs[1]).toHaveAttribute('alt', 'Corrosion at the flex connector (microscope camera)');
		expect(screen.getAllByTestId('photo-tile')[1]).toHaveTextContent('Microscope camera');
	});

	it('opens the display size in a modal dialog, focuses it, and closes on Escape back to the thumbnail', async () => {
		render(PhotoGrid, { photos: two });
		const thumb = screen.getByRole('button', { name: /enlarge: corrosion/i });
		await userEvent.click(thumb);
		const dialog = screen.getByRole('dialog', { name: /corrosion at the flex connector/i });
		expect(dialog).toHaveAttribute('aria-modal', 'true');
		expect(within(dialog).getByRole('img')).toHaveAttribute('src', '/photos/b/display');
		expect(dialog).toHaveTextContent('2 of 2');
		expect(dialog).toHaveTextContent('Microscope camera');
		expect(dialog).toHaveTextContent('Mira Saltmarsh');
		expect(within(dialog).getByRole('link', { name: 'Open full size' })).toHaveAttribute(
			'href',
			'/photos/b/original'
		);
		expect(within(dialog).getByRole('button', { name: /close/i })).toHaveFocus();
		await userEvent.keyboard('{Escape}');
		expect(screen.queryByRole('dialog')).not.toBeInTheDocument();
		expect(thumb).toHaveFocus();
	});

	it('steps through photos with the arrow keys and buttons, wrapping around', async () => {
		render(PhotoGrid, { photos: two });
		await userEvent.click(screen.getByRole('button', { name: /enlarge: indicator/i }));
		await userEvent.keyboard('{ArrowRight}');
		expect(screen.getByRole('dialog')).toHaveTextContent('2 of 2');
		await userEvent.click(screen.getByRole('button', { name: 'Next photo' }));
		expect(screen.getByRole('dialog')).toHaveTextContent('1 of 2');
		await userEvent.keyboard('{ArrowLeft}');
		expect(screen.getByRole('dialog')).toHaveTextContent('Corrosion at the flex connector');
	});

	it('keeps Tab inside the dialog', async () => {
		render(PhotoGrid, { photos: two });
		await userEvent.click(screen.getByRole('button', { name: /enlarge: indicator/i }));
		const dialog = screen.getByRole('dialog');
		for (let i = 0; i < 8; i++) {
			await userEvent.tab();
			expect(dialog.contains(document.activeElement)).toBe(true);
		}
	});

	it('toggles zoom to full size, loading the original only then', async () => {
		render(PhotoGrid, { photos: two });
		await userEvent.click(screen.getByRole('button', { name: /enlarge: indicator/i }));
		const zoom = screen.getByRole('button', { name: 'Zoom to full size' });
		expect(zoom).toHaveAttribute('aria-pressed', 'false');
		await userEvent.click(zoom);
		expect(screen.getByRole('button', { name: 'Fit to screen' })).toHaveAttribute('aria-pressed', 'true');
		expect(within(screen.getByRole('dialog')).getByRole('img')).toHaveAttribute('src', '/photos/a/original');
	});

	it('offers removal only where allowed, asks first, and shows a refusal', async () => {
		const onremove = vi.fn().mockResolvedValue('Only the person who uploaded this photo can remove it.');
		render(PhotoGrid, { photos: two, onremove, canRemove: (p: PhotoDto) => p.id === 'b' });
		await userEvent.click(screen.getByRole('button', { name: /enlarge: indicator/i }));
		expect(screen.queryByRole('button', { name: 'Remove' })).not.toBeInTheDocument();
		await userEvent.keyboard('{ArrowRight}');
		await userEvent.click(screen.getByRole('button', { name: 'Remove' }));
		expect(onremove).not.toHaveBeenCalled();
		await userEvent.click(screen.getByRole('button', { name: 'Yes, remove' }));
		expect(onremove).toHaveBeenCalledWith(two[1]);
		await waitFor(() =>
			expect(screen.getByRole('alert')).toHaveTextContent('Only the person who uploaded this photo')
		);
	});
});

describe('PhotoGrid customer report choice', () => {
	it('includes a photo in the customer report, and puts the box back when the server refuses', async () => {
		const onshow = vi
			.fn()
			.mockResolvedValueOnce(null)
			.mockResolvedValueOnce('The server could not be reached; nothing was changed.');
		render(PhotoGrid, { photos: two, onshow, canRemove: () => true });
		await userEvent.click(screen.getByRole('button', { name: /enlarge: indicator/i }));
		const box = screen.getByRole('checkbox', { name: 'In the customer report' });
		expect(box).not.toBeChecked();
		await userEvent.click(box);
		expect(onshow).toHaveBeenLastCalledWith(two[0], true);
		await userEvent.keyboard('{ArrowRight}');
		const second = screen.getByRole('checkbox', { name: 'In the customer report' });
		await userEvent.click(second);
		await waitFor(() => expect(screen.getByRole('alert')).toHaveTextContent('nothing was changed'));
		expect(second).not.toBeChecked();
	});
});
