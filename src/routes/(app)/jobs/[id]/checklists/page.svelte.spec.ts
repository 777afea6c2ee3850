import { render, screen, within } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import { CAUTION_DEFERENCE } from '$lib/flows/cautions';
import Page from './+page.svelte';

const data = {
	view: {
		jobId: 'j1',
		jobStatus: 'repairing',
		run: { id: 'r1', verdictCode: 'charge-chip', finishedAt: null },
		verdict: {
			title: 'Charging chip damaged by liquid',
			severity: 'board-level',
			repair: '- [ ] Replace the chip\n- [ ] New adhesive and seals',
			risks: 'Water resistance is no longer assured.',
			parts: [],
			cautions: ['hot-air', 'battery']
		},
		repair: [{ key: 'r1', label: 'Replace the chip', result: null, note: '' }],
		functionTest: [],
		confirmation: null
	},
	statusLabels: { repairing: 'Repairing' },
	risksHtml: '<p>Water resistance is no longer assured.</p>'
};

describe('checklists page', () => {
	it("shows the verdict's cautions with the line deferring to local codes, and the risks open", () => {
		render(Page, { data: data as never, form: null });
		const cautions = screen.getByRole('region', { name: 'Cautions' });
		expect(
			within(cautions)
				.getAllByRole('note')
				.map((n) => n.getAttribute('data-caution'))
		).toEqual(['hot-air', 'battery']);
		expect(cautions).toHaveTextContent(CAUTION_DEFERENCE);
		const risks = screen.getByRole('region', { name: /Remaining risks/ });
		expect(risks).toHaveTextContent('Water resistance is no longer assured.');
		expect(risks.closest('details')).toBeNull();
		expect(risks).toBeVisible();
	});
});
