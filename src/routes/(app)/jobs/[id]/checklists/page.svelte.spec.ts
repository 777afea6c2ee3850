import { render, screen, within } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import { CAUTION_DEFERENCE } from '$lib/flows/cautions';
import { defaults } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { confirmForm, functionTestForm, repairForm } from '$lib/schemas/checklist';
import Page from './+page.svelte';

const forms = (confirmErrors: Record<string, string[]> = {}) => ({
	repair: defaults(zod4(repairForm), { id: 'repair' }),
	functionTest: defaults(zod4(functionTestForm([])), { id: 'functionTest' }),
	confirm: { ...defaults(zod4(confirmForm), { id: 'confirm' }), errors: confirmErrors, valid: false }
});

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
	risksHtml: '<p>Water resistance is no longer assured.</p>',
	forms: forms()
};

describe('checklists page', () => {
	it("shows the verdict's cautions with the line deferring to local codes, and the risks open", () => {
		render(Page, { data: data as never });
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

	it('shows a refusal beside the field it belongs to, tied to it for screen readers', () => {
		const refused = {
			...data,
			forms: forms({ note: ['Say what the repair found instead of the verdict.'] })
		};
		render(Page, { data: refused as never });
		const note = screen.getByLabelText(/^Note/);
		expect(note).toHaveAttribute('aria-invalid', 'true');
		expect(note).toHaveAccessibleDescription('Say what the repair found instead of the verdict.');
	});
});
