import { render, screen } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import { CAUTION_CODES, CAUTIONS } from '$lib/flows/cautions';
import CautionBanner from './CautionBanner.svelte';
import Markdown from './Markdown.svelte';

describe('CautionBanner', () => {
	it('shows the words and the rule, with the reason behind a "Why" disclosure', () => {
		render(CautionBanner, { code: 'solvent' });
		const banner = screen.getByRole('note', { name: 'Caution: Isopropyl alcohol' });
		expect(banner).toHaveTextContent(CAUTIONS.solvent.rule);
		const why = screen.getByText('Why').closest('details')!;
		expect(why.open).toBe(false);
		// The flash point named in the vocabulary (NIOSH Pocket Guide) is the reason given.
		expect(why).toHaveTextContent('11.7 °C');
		expect(iconOf(banner)).toBeTruthy();
	});

	// The icon beside the words (the "Why" chevron is an svg too, further down).
	const iconOf = (banner: HTMLElement) =>
		[...(banner.querySelector(':scope > div > svg')?.classList ?? [])].find(
			(c) => c.startsWith('lucide-') && c !== 'lucide-icon'
		);

	it.each(CAUTION_CODES.map((c) => [c]))('draws %s with an icon, its words and rule', (code) => {
		render(CautionBanner, { code });
		const banner = screen.getByRole('note', { name: `Caution: ${CAUTIONS[code].words}` });
		expect(banner).toHaveTextContent(CAUTIONS[code].rule);
		expect(iconOf(banner)).toBeTruthy();
	});

	it('gives every caution an icon of its own', () => {
		const icons = CAUTION_CODES.map((code) => {
			const { unmount } = render(CautionBanner, { code });
			const icon = iconOf(screen.getByRole('note'));
			unmount();
			return icon;
		});
		expect(icons.every(Boolean)).toBe(true);
		expect(new Set(icons).size).toBe(CAUTION_CODES.length);
	});
});

describe('Markdown', () => {
	it('renders sanitised markdown', () => {
		const { container } = render(Markdown, {
			source: '**Battery** first <img src=x onerror="window.pwned=1">'
		});
		expect(container.querySelector('strong')).toHaveTextContent('Battery');
		expect(container.innerHTML).not.toContain('onerror');
	});
});
