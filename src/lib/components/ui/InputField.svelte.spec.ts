import { render, screen } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import InputField from './InputField.svelte';

describe('InputField', () => {
	it('renders one labelled .field input with the attributes passed through and the hint tied to it', () => {
		render(InputField, {
			id: 'taxRatePercent',
			name: 'taxRatePercent',
			label: 'Tax rate (%)',
			hint: 'From 0 to 100.',
			type: 'number',
			step: '0.01',
			min: '0',
			max: '100',
			inputClass: 'font-mono',
			class: 'max-w-xs',
			value: 19
		});
		const input = screen.getByLabelText('Tax rate (%)') as HTMLInputElement;
		expect(input).toHaveAttribute('name', 'taxRatePercent');
		expect(input).toHaveAttribute('type', 'number');
		expect(input).toHaveAttribute('step', '0.01');
		expect(input).toHaveClass('field', 'font-mono');
		expect(input.value).toBe('19');
		expect(input).toHaveAccessibleDescription('From 0 to 100.');
		expect(input).not.toHaveAttribute('aria-invalid');
		expect(input.parentElement).toHaveClass('max-w-xs');
	});

	it('marks the input invalid with the first error, and the hint can give way to it', () => {
		render(InputField, {
			id: 'pw',
			name: 'password',
			label: 'Password',
			hint: 'At least 10 characters.',
			hintOnError: false,
			error: ['Too short.', 'second'],
			value: 'abc'
		});
		const input = screen.getByLabelText('Password');
		expect(input).toHaveAttribute('aria-invalid', 'true');
		expect(input).toHaveAccessibleDescription('Too short.');
		expect(screen.queryByText('At least 10 characters.')).toBeNull();
		expect(screen.queryByText('second')).toBeNull();
	});
});
