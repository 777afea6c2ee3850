import { render, screen, within } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { groupSymptoms } from '$lib/symptoms';
import SymptomPicker from './SymptomPicker.svelte';

const rows = [
	{
		code: 'no-sound',
		label: 'No sound from the loudspeaker',
		group: 'Sound and voice',
		sortOrder: 300,
		retired: false
	},
	{ code: 'no-power', label: 'No power', group: 'Power and start', sortOrder: 100, retired: false },
	{ code: 'vibration', label: 'No vibration', group: 'Sound and voice', sortOrder: 330, retired: false },
	{ code: 'restart-loop', label: 'Restart loop', group: 'Power and start', sortOrder: 120, retired: false }
];

describe('SymptomPicker', () => {
	it('shows one labelled group per catalogue group, in sort order, each choice a 44 px target', () => {
		render(SymptomPicker, { groups: groupSymptoms(rows) });
		const groups = screen.getAllByRole('group');
		expect(groups.map((g) => g.querySelector('legend')?.textContent)).toEqual([
			'Power and start',
			'Sound and voice'
		]);
		expect(
			within(groups[0])
				.getAllByRole('checkbox')
				.map((c) => (c as HTMLInputElement).value)
		).toEqual(['no-power', 'restart-loop']);
		for (const box of screen.getAllByRole('checkbox'))
			expect(box.closest('label')).toHaveClass('min-h-touch');
	});

	it('posts the codes ticked, whatever group they are in', async () => {
		const user = userEvent.setup();
		const { container } = render(SymptomPicker, { groups: groupSymptoms(rows), selected: [] });
		await user.click(screen.getByRole('checkbox', { name: 'No vibration' }));
		await user.click(screen.getByRole('checkbox', { name: 'No power' }));
		const form = document.createElement('form');
		form.append(container.firstElementChild!.cloneNode(true));
		expect(new FormData(form).getAll('symptoms')).toEqual(['no-power', 'vibration']);
	});

	it('says where to go when the catalogue is empty', () => {
		render(SymptomPicker, { groups: [] });
		expect(screen.queryByRole('checkbox')).toBeNull();
		expect(screen.getByText(/catalogue is empty/)).toBeInTheDocument();
	});
});
