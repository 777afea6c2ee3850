import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as jobs from '$lib/server/jobs/queries';
import { intake, member, type Member } from '$lib/server/testing/world';
import { postAction } from '$lib/server/testing/actions';
import { actions } from './+page.server';

// Today's "Take it" through its row superform (id `take-<job id>`), on the in-memory database.
let first: Member;
let second: Member;
let jobId: string;

function take(user: Member, id: string) {
	return postAction(actions.take, '/?/take', { jobId: id }, { locals: { user }, routeId: '/(app)' });
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	first = await member('Tove Arnell', 'tove@take.test', 'technician');
	second = await member('Juno Marsh', 'juno@take.test', 'technician');
	jobId = (await jobs.create(first.id, intake(14))).id;
});

describe('take it', () => {
	it('refuses a post without a job, takes an unassigned one, and tells the second taker who was first', async () => {
		expect((await jobs.get(jobId))!.technicianId).toBeNull();
		const none = await take(first, 'nope');
		expect(none).toMatchObject({
			status: 400,
			form: { id: 'take-nope', errors: { jobId: ['Choose a job to take.'] } }
		});

		const mine = await take(first, jobId);
		expect(mine).toMatchObject({
			status: 200,
			form: { id: `take-${jobId}`, message: expect.stringMatching(/The job is yours/) }
		});
		expect((await jobs.get(jobId))!.technicianId).toBe(first.id);

		const late = await take(second, jobId);
		expect(late.status).toBe(409);
		expect(late.form.errors._errors).toEqual(['Tove Arnell took this job first.']);
		expect((await jobs.get(jobId))!.technicianId).toBe(first.id);
	});
});
