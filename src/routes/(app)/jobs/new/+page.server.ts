import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import { symptomVocabulary } from '$lib/server/jobs/symptoms';
import { makeJobIntake } from '$lib/schemas/job';
import type { Actions, PageServerLoad } from './$types';

const schema = () => zod4(makeJobIntake(symptomVocabulary()));

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const form = await superValidate(schema(), { id: 'intake' });
	return { form, symptoms: symptomVocabulary() };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await superValidate(event.request, schema(), { id: 'intake' });
		if (!form.valid) return fail(400, { form });
		const job = await jobs.create(user.id, form.data);
		redirect(303, `/jobs/${job.id}?created=1`);
	}
};
