import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as jobs from '$lib/server/jobs/queries';
import * as quotes from '$lib/server/quotes/queries';
import { sendReport } from '$lib/server/reports/customer';
import { intake, member } from '$lib/server/testing/world';
import { postAction } from '$lib/server/testing/actions';
import { actions } from './+page.server';

// The customer's approve/decline and pay forms through their superforms, on the in-memory
// database, behind the link's own guard: each answer is the form with its message or refusal, and
// the quote shows what was stored.
let token: string;
let jobId: string;
let quoteId: string;

function post(action: 'approve' | 'decline' | 'pay', fields: Record<string, string>, t = token) {
	return postAction(actions[action], `/r/${t}?/${action}`, fields, {
		params: { token: t },
		routeId: '/r/[token]'
	});
}
const stored = async () => (await quotes.listForJob(jobId)).find((q) => q.id === quoteId)!;

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	const tech = await member('Sefa Lund', 'sefa@customer-page.test', 'technician');
	jobId = (await jobs.create(tech.id, intake(13))).id;
	quoteId = (
		await quotes.save(tech.id, jobId, {
			lines: [{ description: 'Diagnosis', kind: 'fee', quantity: 1, unitMinor: 4900 }]
		})
	).id;
	token = new URL((await sendReport(tech.id, jobId)).url).pathname.split('/').pop()!;
});

describe('customer decision', () => {
	it('keeps a name that is not a full name beside its field, then records the approval once', async () => {
		const short = await post('approve', { quoteId, name: 'E' });
		expect(short).toMatchObject({ status: 400, form: { id: 'decision', data: { name: 'E' } } });
		expect(short.form.errors.name?.[0]).toMatch(/full name/);
		expect((await stored()).status).toBe('sent');

		const approved = await post('approve', { quoteId, name: 'Rhea Solberg' });
		expect(approved).toMatchObject({ status: 200, form: { message: 'Thank you: the quote is approved.' } });
		expect(await stored()).toMatchObject({ status: 'approved', approvedName: 'Rhea Solberg' });

		const declined = await post('decline', { quoteId, name: 'Rhea Solberg' });
		expect(declined.status).toBe(409);
		expect(declined.form.errors._errors?.[0]).toMatch(/already approved/);
		expect((await stored()).status).toBe('approved');
	});

	it('refuses a bad token before reading the form', async () => {
		await expect(post('approve', { quoteId, name: 'Rhea Solberg' }, 'x'.repeat(43))).rejects.toMatchObject({
			status: 404
		});
	});
});

describe('pay online', () => {
	it('refuses a post that names nothing to pay, and says when online payment is off', async () => {
		const nothing = await post('pay', { quoteId });
		expect(nothing).toMatchObject({
			status: 400,
			form: { id: 'pay', errors: { kind: ['Choose what to pay.'] } }
		});
		const off = await post('pay', { quoteId, kind: 'rest' });
		expect(off.status).toBe(503);
		expect(off.form.errors._errors?.[0]).toMatch(/pay at the counter/);
	});
});
