import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/guards';
import * as jobs from '$lib/server/jobs/queries';
import * as catalogue from '$lib/server/symptoms/queries';
import * as settings from '$lib/server/settings/queries';
import { makeJobIntake } from '$lib/schemas/job';
import { groupSymptoms } from '$lib/symptoms';
import { localDayAfter } from '$lib/domain/queue';
import * as preRepair from '$lib/server/checklists/preRepair';
import type { Actions, PageServerLoad } from './$types';

// Intake records any offered symptom of the catalogue, whether or not a flow covers it.
const schemaFor = (offered: { code: string }[]) => zod4(makeJobIntake(offered.map((s) => s.code)));

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const [offered, { turnaroundDays }] = await Promise.all([catalogue.offered(), settings.getWorkflow()]);
	const form = await superValidate(schemaFor(offered), { id: 'intake' });
	// Proposed in UTC here; the page moves it to the browser's own calendar day once it runs.
	form.data.promisedDate = localDayAfter(new Date(), turnaroundDays, 0);
	return { form, symptomGroups: groupSymptoms(offered), turnaroundDays };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, 'technician');
		const body = await event.request.formData();
		const form = await superValidate(body, schemaFor(await catalogue.offered()), { id: 'intake' });
		// The pre-repair test is its own section (checklists/preRepair.ts), read beside the intake schema.
		const pre = preRepair.fromForm(body);
		if (pre && !pre.success) {
			form.valid = false;
			form.errors.notes = [pre.error.issues[0]?.message ?? 'Check the pre-repair test.'];
		}
		if (!form.valid) return fail(400, { form });
		const test = pre?.success
			? preRepair.build(await preRepair.itemsFor(form.data.maker, form.data.model), pre.data, user.id)
			: null;
		const job = await jobs.create(user.id, form.data, test);
		redirect(303, `/jobs/${job.id}?created=1`);
	}
};
