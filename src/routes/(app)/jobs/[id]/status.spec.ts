import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as jobs from '$lib/server/jobs/queries';
import { makeEvent } from '$lib/server/testing/events';
import { intake, member, type Member } from '$lib/server/testing/world';
import { postAction, type SpecForm } from '$lib/server/testing/actions';
import { actions, load } from './+page.server';

// The job page's status, technician and consent forms through superforms, on the in-memory
// database: a refusal keeps what was typed and says why; a good post moves the job and says so.
let tech: Member;
let other: Member;
let jobId: string;

function post(action: 'status' | 'assign' | 'consent' | 'dataOutcome', fields: Record<string, string>) {
	return postAction(actions[action], `/jobs/${jobId}?/${action}`, fields, {
		params: { id: jobId },
		locals: { user: tech },
		routeId: '/(app)/jobs/[id]'
	});
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	tech = await member('Wren Tallis', 'wren@status.test', 'technician');
	other = await member('Oren Vale', 'oren@status.test', 'technician');
	jobId = (await jobs.create(tech.id, intake(11))).id;
});

describe('job page forms', () => {
	it('opens with an empty note and the job’s technician', async () => {
		const page = (await load(
			makeEvent(`/jobs/${jobId}`, { params: { id: jobId }, locals: { user: tech } }) as never
		)) as { statusForm: SpecForm; assignForm: SpecForm };
		expect(page.statusForm.data).toMatchObject({ note: '' });
		expect(page.assignForm.data).toEqual({ technicianId: '' });
	});

	it('refuses a move the job cannot make, keeping the note, and makes one it can', async () => {
		const refused = await post('status', { to: 'ready', note: 'Dried and cleaned' });
		expect(refused.status).toBe(409);
		expect(refused.form.errors._errors?.[0]).toMatch(/cannot move/);
		expect(refused.form.data.note).toBe('Dried and cleaned');
		expect((await jobs.get(jobId))?.status).toBe('received');

		const none = await post('status', { note: 'No button pressed' });
		expect(none.status).toBe(400);
		expect(none.form.errors.to?.[0]).toBe('Choose a status.');
		expect(none.form.data.note).toBe('No button pressed');

		const moved = await post('status', { to: 'diagnosing', note: 'Opened, corrosion found' });
		expect(moved).toMatchObject({ status: 200, form: { valid: true, message: 'Moved to Diagnosing.' } });
		expect((await jobs.get(jobId))?.status).toBe('diagnosing');
	});

	it('assigns and unassigns, and refuses a value that is not a staff member', async () => {
		const bad = await post('assign', { technicianId: 'not-a-person' });
		expect(bad.status).toBe(400);
		expect(bad.form.errors.technicianId?.[0]).toBe('Choose a staff member.');
		expect(await post('assign', { technicianId: other.id })).toMatchObject({
			form: { message: 'Assigned.' }
		});
		expect((await jobs.get(jobId))?.technicianId).toBe(other.id);
		expect(await post('assign', { technicianId: '' })).toMatchObject({ form: { message: 'Unassigned.' } });
		expect((await jobs.get(jobId))?.technicianId).toBeNull();
	});

	it('records what became of the data, keeping the note when no outcome is chosen', async () => {
		const page = (await load(
			makeEvent(`/jobs/${jobId}`, { params: { id: jobId }, locals: { user: tech } }) as never
		)) as { dataOutcomeForm: SpecForm };
		expect(page.dataOutcomeForm.data).toEqual({ outcome: '', note: '' }); // nothing pre-selected
		const none = await post('dataOutcome', { note: 'Copied to the shop drive' });
		expect(none.status).toBe(400);
		expect(none.form.errors.outcome?.[0]).toMatch(/Choose what became/);
		expect(none.form.data.note).toBe('Copied to the shop drive');
		const short = await post('dataOutcome', { outcome: 'backed-up', note: 'ok' });
		expect(short.form.errors.note?.[0]).toMatch(/Add a note/);
		const saved = await post('dataOutcome', { outcome: 'backed-up', note: 'Copied to the shop drive' });
		expect(saved).toMatchObject({ status: 200, form: { message: expect.stringMatching(/^Recorded: /) } });
		expect((await jobs.get(jobId))?.dataOutcome).toBe('backed-up');
	});

	it('records consent to open', async () => {
		const out = await post('consent', {});
		expect(out).toMatchObject({ status: 200, form: { message: 'Consent to open recorded.' } });
		expect((await jobs.get(jobId))?.consentToOpen).toBe(true);
	});
});
