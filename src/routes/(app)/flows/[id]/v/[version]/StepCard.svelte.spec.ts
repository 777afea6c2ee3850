import { render, screen, within } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import type { MeasureStep } from '$lib/flows/schema';
import StepCard from './StepCard.svelte';

const measure: MeasureStep = {
	kind: 'measure',
	title: 'Standby current on the bench supply',
	minutes: 3,
	unit: 'A',
	domain: { min: 0 },
	provenance: [
		{ about: '0.02 A standby limit', basis: 'common-practice', source: 'no published source' },
		{ about: 'supply voltage', basis: 'maker' }
	],
	ranges: [
		{ max: 0.02, label: 'Standby', next: 'ok' },
		{ min: 0.02, label: 'Too high', next: 'short' }
	]
};

describe('StepCard on the version page', () => {
	it("shows where a measure step's numbers come from, below its bands", () => {
		const { container } = render(StepCard, { id: 'standby', step: measure, titleOf: (id: string) => id });
		const region = screen.getByRole('region', { name: 'Where these numbers come from' });
		expect(
			within(region)
				.getAllByRole('listitem')
				.map((li) => li.textContent?.replace(/\s+/g, ' ').trim())
		).toEqual([
			'0.02 A standby limit — common practice, no published source',
			"supply voltage — maker's documentation: check your model's"
		]);
		// Headings follow the card's own outline (the step title is an h3).
		expect(within(region).getByRole('heading', { level: 4 })).toBeInTheDocument();
		const table = container.querySelector('table')!;
		expect(table.compareDocumentPosition(region) & Node.DOCUMENT_POSITION_FOLLOWING).toBeTruthy();
	});

	it('shows no provenance section for a step without entries', () => {
		render(StepCard, {
			id: 'standby',
			step: { ...measure, provenance: undefined },
			titleOf: (id: string) => id
		});
		expect(screen.queryByRole('region', { name: 'Where these numbers come from' })).toBeNull();
	});
});
