import { render, screen } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { afterEach, describe, expect, it, vi } from 'vitest';
import ThemeToggle from './ThemeToggle.svelte';

describe('ThemeToggle', () => {
	afterEach(() => {
		document.documentElement.className = '';
		vi.unstubAllGlobals();
	});

	it('switches <html> to the dark bench theme and remembers the choice on the server', async () => {
		const fetchMock = vi.fn().mockResolvedValue(new Response('{}'));
		vi.stubGlobal('fetch', fetchMock);
		render(ThemeToggle);
		const button = screen.getByRole('button', { name: /bench dark/i });
		expect(button).toHaveAttribute('aria-pressed', 'false');
		await userEvent.click(button);
		expect(document.documentElement).toHaveClass('dark');
		expect(button).toHaveAttribute('aria-pressed', 'true');
		expect(fetchMock).toHaveBeenCalledWith(
			'/theme',
			expect.objectContaining({ method: 'POST', body: '{"theme":"dark"}' })
		);
	});

	it('starts pressed when the page was served dark', () => {
		document.documentElement.classList.add('dark');
		render(ThemeToggle);
		expect(screen.getByRole('button', { name: /light/i })).toHaveAttribute('aria-pressed', 'true');
	});
});
