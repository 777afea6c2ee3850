import { render, screen, within } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { functionTestsFor } from '$lib/domain/functionTests';
import PreRepairGrid from './PreRepairGrid.svelte';

const items = functionTestsFor(['headphone-socket'], 'before');

/** The grid's fields as the form would post them. */
function posted(container: HTMLElement) {
	const form = document.createElement('form');
	form.append(container.firstElementChild!.cloneNode(true));
	// Cloned radios keep `checked`; disabled fields are left out as a browser would.
	return new FormData(form);
}

describe('pre-repair grid', () => {
	it('starts every function at "Not tested", one row each with 44 px targets', () => {
		const { container } = render(PreRepairGrid, { items });
		const rows = screen.getAllByRole('radiogroup');
		expect(rows).toHaveLength(items.length);
		expect(rows.map((r) => r.getAttribute('aria-label'))).not.toContain('NFC');
		for (const row of rows) {
			expect(within(row).getByRole('radio', { name: 'Not tested' })).toBeChecked();
			for (const radio of within(row).getAllByRole('radio'))
				expect(radio.closest('label')!.className).toContain('min-h-touch');
		}
		expect(screen.getByTestId('pre-repair-count')).toHaveTextContent(`0 of ${items.length} tested.`);
		const data = posted(container);
		expect(data.get('pre-present')).toBe('1');
		expect(data.get('pre-result-boot')).toBe('not-tested');
	});

	it('records works and does-not-work, asking what a broken function does', async () => {
		const user = userEvent.setup();
		const { container } = render(PreRepairGrid, { items });
		const boot = screen.getByRole('radiogroup', { name: 'Boot' });
		await user.click(within(boot).getByText('Works'));
		const speaker = screen.getByRole('radiogroup', { name: 'Loudspeaker' });
		expect(within(speaker).queryByRole('textbox')).toBeNull();
		await user.click(within(speaker).getByText('Does not work'));
		await user.type(within(speaker).getByRole('textbox', { name: 'Note on Loudspeaker' }), 'Crackles');
		expect(screen.getByTestId('pre-repair-count')).toHaveTextContent(
			`2 of ${items.length} tested, 1 not working.`
		);
		const data = posted(container);
		expect(data.get('pre-result-boot')).toBe('pass');
		expect(data.get('pre-result-loudspeaker')).toBe('fail');
		expect(data.get('pre-note-loudspeaker')).toBe('Crackles');
	});

	it('"Could not power on" sets every row aside and says why', async () => {
		const user = userEvent.setup();
		render(PreRepairGrid, { items });
		await user.click(screen.getByRole('checkbox', { name: 'Could not power on' }));
		expect(screen.getByTestId('pre-repair-count')).toHaveTextContent(
			'Every function is recorded as not tested: “Could not power on”.'
		);
		for (const radio of screen.getAllByRole('radio')) expect(radio).toBeDisabled();
	});

	it('shows a saved test again, with its answers', () => {
		render(PreRepairGrid, {
			items,
			initial: {
				couldNotPowerOn: false,
				items: [{ key: 'touch', label: 'Touch', result: 'fail', note: 'Ghost touches' }],
				at: '2026-01-01T00:00:00.000Z',
				by: null
			}
		});
		const touch = screen.getByRole('radiogroup', { name: 'Touch' });
		expect(within(touch).getByRole('radio', { name: 'Does not work' })).toBeChecked();
		expect(within(touch).getByRole('textbox')).toHaveValue('Ghost touches');
	});
});
