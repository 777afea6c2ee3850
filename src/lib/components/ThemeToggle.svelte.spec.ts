import { render, screen } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { afterEach, describe, expect, it } from 'vitest';
import ThemeToggle from './ThemeToggle.svelte';

describe('ThemeToggle', () => {
	afterEach(() => {
		document.documentElement.className = '';
		document.cookie = 'theme=; max-age=0; path=/';
	});

	it('switches <html> to the dark bench theme and remembers the choice in the theme cookie', async () => {
		render(ThemeToggle);
		const button = screen.getByRole('button', { name: /bench dark/i });
		expect(button).toHaveAttribute('aria-pressed', 'false');
		await userEvent.click(button);
		expect(document.documentElement).toHaveClass('dark');
		expect(button).toHaveAttribute('aria-pressed', 'true');
		expect(document.cookie).toContain('theme=dark');
		await userEvent.click(screen.getByRole('button', { name: /light/i }));
		expect(document.documentElement).toHaveClass('light');
		expect(document.cookie).toContain('theme=light');
	});

	it('starts pressed when the page was served dark', () => {
		document.documentElement.classList.add('dark');
		render(ThemeToggle);
		expect(screen.getByRole('button', { name: /light/i })).toHaveAttribute('aria-pressed', 'true');
	});
});
