import { render, screen } from '@testing-library/svelte';
import { createRawSnippet } from 'svelte';
import { describe, expect, it } from 'vitest';
import FormField, { type FieldControl } from './FormField.svelte';

// The control is rendered by the caller's snippet with the ids and aria values FormField hands it.
const input = createRawSnippet((c: () => FieldControl) => ({
	render: () =>
		`<input id="${c().id}" ${c().invalid ? 'aria-invalid="true"' : ''} ${c().describedby ? `aria-describedby="${c().describedby}"` : ''} />`
}));

describe('FormField', () => {
	it('labels the control and ties the hint to it', () => {
		render(FormField, { id: 'currency', label: 'Currency', hint: 'ISO 4217 code.', children: input });
		const field = screen.getByLabelText('Currency');
		expect(field).toHaveAccessibleDescription('ISO 4217 code.');
		expect(field).not.toHaveAttribute('aria-invalid');
	});

	it('marks the control invalid and describes it with the first error, keeping the hint', () => {
		render(FormField, {
			id: 'currency',
			label: 'Currency',
			hint: 'ISO 4217 code.',
			error: ['Use a three-letter code.', 'second'],
			children: input
		});
		const field = screen.getByLabelText('Currency');
		expect(field).toHaveAttribute('aria-invalid', 'true');
		expect(field).toHaveAccessibleDescription('ISO 4217 code. Use a three-letter code.');
		expect(screen.queryByText('second')).toBeNull();
	});

	it('lets the hint give way to the error when asked', () => {
		render(FormField, {
			id: 'pw',
			label: 'Password',
			hint: 'At least 10 characters.',
			hintOnError: false,
			error: 'Too short.',
			children: input
		});
		expect(screen.getByLabelText('Password')).toHaveAccessibleDescription('Too short.');
		expect(screen.queryByText('At least 10 characters.')).toBeNull();
	});
});
