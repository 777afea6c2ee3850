import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as jobs from '$lib/server/jobs/queries';
import * as links from '$lib/server/reports/links';
import * as preRepair from '$lib/server/checklists/preRepair';
import { intake, member, type Member } from '$lib/server/testing/world';
import { postAction } from '$lib/server/testing/actions';
import { actions } from './+page.server';

// The job page's pre-repair test, "Send report" and "Revoke" through their superforms, on the
// in-memory database: each answer is the form with its message or refusal, and what was stored.
let tech: Member;
let jobId: string;

async function post(action: 'preRepair' | 'sendReport' | 'revokeLink', fields: Record<string, string>) {
	return postAction<{ reportUrl?: string }>(actions[action], `/jobs/${jobId}?/${action}`, fields, {
		params: { id: jobId },
		locals: { user: tech },
		routeId: '/(app)/jobs/[id]'
	});
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	tech = await member('Ilka Morrow', 'ilka@customer-actions.test', 'technician');
	jobId = (await jobs.create(tech.id, intake(12))).id;
});

describe('pre-repair test', () => {
	it('refuses a post without the section or with a result it does not know, and saves a good one', async () => {
		const [first] = await preRepair.itemsFor('Corvana', 'Tern 5');
		const absent = await post('preRepair', {});
		expect(absent.status).toBe(400);
		expect(absent.form).toMatchObject({
			id: 'preRepair',
			errors: { _errors: [expect.stringMatching(/reload/)] }
		});

		const odd = await post('preRepair', { 'pre-present': '1', [`pre-result-${first.key}`]: 'maybe' });
		expect(odd.status).toBe(400);
		expect(odd.form.errors._errors).toHaveLength(1);
		expect((await jobs.get(jobId))!.preRepairTest).toBeNull();

		const saved = await post('preRepair', {
			'pre-present': '1',
			[`pre-result-${first.key}`]: 'fail',
			[`pre-note-${first.key}`]: 'Flickers'
		});
		expect(saved).toMatchObject({ status: 200, form: { message: 'Pre-repair test saved.' } });
		const stored = (await jobs.get(jobId))!.preRepairTest!;
		expect(stored.items.find((i) => i.key === first.key)).toMatchObject({ result: 'fail', note: 'Flickers' });
	});
});

describe('report link', () => {
	it('sends the report with its private link, then revokes that link once', async () => {
		const sent = await post('sendReport', {});
		expect(sent).toMatchObject({
			status: 200,
			form: { id: 'sendReport', message: expect.stringMatching(/Report sent/) },
			reportUrl: expect.stringMatching(/\/r\/[A-Za-z0-9_-]{43}$/)
		});
		const [link] = await links.listForJob(jobId);
		expect(link.revokedAt).toBeNull();

		const bad = await post('revokeLink', { linkId: 'not-a-link' });
		expect(bad).toMatchObject({
			status: 400,
			form: { id: 'revokeLink-not-a-link', errors: { linkId: ['Choose a link.'] } }
		});
		expect((await links.listForJob(jobId))[0].revokedAt).toBeNull();

		const revoked = await post('revokeLink', { linkId: link.id });
		expect(revoked).toMatchObject({
			status: 200,
			form: { id: `revokeLink-${link.id}`, message: expect.stringMatching(/Link revoked/) }
		});
		expect((await links.listForJob(jobId))[0].revokedAt).not.toBeNull();
		expect((await post('revokeLink', { linkId: link.id })).form.message).toMatch(/already closed/);
	});
});
