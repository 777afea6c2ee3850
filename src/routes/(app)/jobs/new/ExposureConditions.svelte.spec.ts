import { render, screen } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import ExposureConditions from './ExposureConditions.svelte';

describe('ExposureConditions', () => {
	it('starts at still water at room temperature, one tap per answer, each a 44 px target', () => {
		render(ExposureConditions, { freshWater: true });
		expect(screen.getByRole('radio', { name: /Cold or room/ })).toBeChecked();
		expect(screen.getByRole('radio', { name: /^Still/ })).toBeChecked();
		expect(screen.getByRole('checkbox', { name: /Soap or detergent/ })).not.toBeChecked();
		for (const radio of screen.getAllByRole('radio'))
			expect(radio.closest('label')).toHaveClass('min-h-touch');
	});

	it('sends the form names the intake schema reads', async () => {
		const user = userEvent.setup();
		const { container } = render(ExposureConditions, { freshWater: true });
		await user.click(screen.getByRole('radio', { name: /Hot/ }));
		await user.click(screen.getByRole('radio', { name: /Jet or running tap/ }));
		await user.click(screen.getByRole('checkbox', { name: /Soap or detergent/ }));
		const form = document.createElement('form');
		form.append(container.firstElementChild!.cloneNode(true));
		const data = new FormData(form);
		expect(data.get('liquidTemperature')).toBe('hot');
		expect(data.get('waterMotion')).toBe('jet');
		expect(data.get('soapy')).toBe('on');
	});

	it('asks about soap only for fresh water (any other liquid is already outside the test conditions)', () => {
		render(ExposureConditions, { freshWater: false });
		expect(screen.queryByRole('checkbox', { name: /Soap or detergent/ })).toBeNull();
	});
});
