import { isActionFailure } from '@sveltejs/kit';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as jobs from '$lib/server/jobs/queries';
import * as quotes from '$lib/server/quotes/queries';
import { setMoney } from '$lib/server/settings/queries';
import { makeEvent } from '$lib/server/testing/events';
import { intake, member, type Member } from '$lib/server/testing/world';
import { actions, load } from './+page.server';

// The job page's quote form through superforms, on the in-memory database: a refused line keeps
// every typed value and puts its message beside the field; a good one saves a version.
let tech: Member;
let jobId: string;

type Form = {
	valid: boolean;
	data: { description: string[]; unit: string[]; proposal: string };
	errors: Record<string, unknown> & { _errors?: string[] };
	message?: string;
};
type Act = (e: unknown) => Promise<unknown>;

async function saveQuote(fields: [string, string][]) {
	const body = new FormData();
	for (const [k, v] of fields) body.append(k, v);
	const event = makeEvent(`/jobs/${jobId}?/quote`, {
		method: 'POST',
		body,
		params: { id: jobId },
		locals: { user: tech },
		routeId: '/(app)/jobs/[id]'
	});
	const out = await (actions.quote as Act)(event);
	return isActionFailure(out)
		? { status: out.status, form: (out.data as unknown as { form: Form }).form }
		: { status: 200, form: (out as { form: Form }).form };
}
const line = (description: string, unit: string, kind = 'parts', quantity = '1'): [string, string][] => [
	['description', description],
	['kind', kind],
	['quantity', quantity],
	['unit', unit]
];

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	tech = await member('Quill Ashdown', 'quill@quote.test', 'technician');
	jobId = (await jobs.create(tech.id, intake(7))).id;
	await setMoney({ currency: 'EUR', taxRateBasisPoints: 2000, pricesIncludeTax: true });
});

describe('quote form', () => {
	it('opens with a diagnostic fee to price', async () => {
		const page = (await load(
			makeEvent(`/jobs/${jobId}`, { params: { id: jobId }, locals: { user: tech } }) as never
		)) as { quoteForm: Form };
		expect(page.quoteForm.data).toMatchObject({ description: ['Diagnosis'], unit: [''] });
		expect(page.quoteForm.errors).toEqual({});
	});

	it('refuses a bad price beside its row and keeps everything typed; nothing is saved', async () => {
		const { status, form } = await saveQuote([
			...line('Diagnosis', '49', 'fee'),
			...line('Replace the front sensor flex', '-5'),
			['proposal', 'Replace the flex, then test every function.']
		]);
		expect(status).toBe(400);
		expect(form.valid).toBe(false);
		expect(form.errors.unit).toEqual({ 1: ['A price cannot be negative.'] });
		expect(form.errors._errors).toEqual(['Some lines need a look; see the marked fields.']);
		expect(form.data).toMatchObject({
			description: ['Diagnosis', 'Replace the front sensor flex'],
			unit: ['49', '-5'],
			proposal: 'Replace the flex, then test every function.'
		});
		expect(await quotes.listForJob(jobId)).toHaveLength(0);
	});

	it('says "add at least one line" for a form of blank lines', async () => {
		const { status, form } = await saveQuote(line('', ''));
		expect(status).toBe(400);
		expect(form.errors._errors).toEqual(['Add at least one line.']);
	});

	it('saves good lines as a version and says so', async () => {
		const { status, form } = await saveQuote([...line('Diagnosis', '49', 'fee'), ...line('Flex', '80.00')]);
		expect(status).toBe(200);
		expect(form.message).toBe('Quote version 1 saved.');
		const [saved] = await quotes.listForJob(jobId);
		// 49.00 + 80.00 = 129.00, in minor units (cents).
		expect(saved.grossMinor).toBe(12900);
	});
});
