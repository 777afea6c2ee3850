import { render, screen } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import AuditList from './AuditList.svelte';

const at = new Date(Date.UTC(2026, 0, 5, 9, 30));
const entry = (
	id: number,
	action: string,
	details: Record<string, unknown> = {},
	actorName: string | null = 'Ana'
) => ({
	id,
	action,
	actorName,
	at,
	details
});

describe('AuditList', () => {
	it('says every flow action in words, with the version, file or comment and no raw ids', () => {
		render(AuditList, {
			entries: [
				entry(1, 'flow.import', { version: 1, file: 'wet.flow.yaml', checksum: 'ab'.repeat(32) }, null),
				entry(2, 'flow.draft.create', { draftId: '0b7c…', basedOnId: null }),
				entry(3, 'flow.draft.save', { draftId: '0b7c…', revision: 4, times: 3 }),
				entry(4, 'flow.submit', { draftId: '0b7c…' }),
				entry(5, 'flow.send-back', { draftId: '0b7c…', comment: 'Add the solvent caution.' }, 'Ben'),
				entry(6, 'flow.approve', { draftId: '0b7c…' }, 'Ben'),
				entry(7, 'flow.publish', { draftId: '0b7c…', version: 2, checksum: 'cd'.repeat(32) }, 'Ben'),
				entry(8, 'flow.retire', { version: 1 }, 'Ben')
			]
		});
		const lines = screen.getAllByRole('listitem').map((li) => li.textContent?.replace(/\s+/g, ' ').trim());
		expect(lines.map((l) => l?.replace(/^.*?(System|Ana|Ben) /, '$1 '))).toEqual([
			'System published version 1 from flows/wet.flow.yaml',
			'Ana started a draft',
			'Ana edited a draft (3 saves)',
			'Ana submitted a draft for review',
			'Ben sent a draft back: “Add the solvent caution.”',
			'Ben approved a draft',
			'Ben published version 2',
			'Ben retired version 1; no new runs start on it'
		]);
		expect(document.body.textContent).not.toMatch(/draftId|checksum|0b7c/);
	});

	it('keeps the details of other actions', () => {
		render(AuditList, { entries: [entry(1, 'staff.role', { role: 'senior' })] });
		expect(screen.getByRole('listitem')).toHaveTextContent('changed a role (role: senior)');
	});
});
