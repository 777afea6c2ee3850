import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import { symptomVocabulary } from '$lib/server/jobs/symptoms';
import * as settings from '$lib/server/settings/queries';
import { makeJobIntake } from '$lib/schemas/job';
import { localDayAfter } from '$lib/domain/queue';
import type { Actions, PageServerLoad } from './$types';

const schema = () => zod4(makeJobIntake(symptomVocabulary()));

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const [form, { turnaroundDays }] = await Promise.all([
		superValidate(schema(), { id: 'intake' }),
		settings.getWorkflow()
	]);
	// Proposed in UTC here; the page moves it to the browser's own calendar day once it runs.
	form.data.promisedDate = localDayAfter(new Date(), turnaroundDays, 0);
	return { form, symptoms: symptomVocabulary(), turnaroundDays };
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
