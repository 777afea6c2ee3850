import { error, fail } from '@sveltejs/kit';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import { act } from '$lib/server/http';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import * as jobs from '$lib/server/jobs/queries';
import { jobRunsSection } from './runs-section';
import * as symptomCatalogue from '$lib/server/symptoms/queries';
import * as photos from '$lib/server/photos/queries';
import { jobStatusSchema, statusLabels } from '$lib/domain/jobStatus';
import { customerSection } from './customer-section';
import * as quoteActions from './customer-actions';
import { recordDataOutcome } from '$lib/server/jobs/data-outcome';
import { dataOutcomeForm, dataOutcomeInput } from '$lib/schemas/data-outcome';
import { dataOutcomeLabels } from '$lib/domain/data-first';
import * as preRepair from '$lib/server/checklists/preRepair';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const job = await jobs.get(event.params.id);
	if (!job)
		error(404, { message: 'No job with this id. It may have been typed wrong; find it in the job list.' });
	const [staff, symptomLabels, runs, jobPhotos, customerSide, preRepairItems] = await Promise.all([
		jobs.assignableStaff(),
		symptomCatalogue.labels(),
		jobRunsSection(job), // the Runs section (./JobRuns.svelte)
		photos.listForJob(job.id), // the Photos section
		customerSection(job.id), // the Quote and Customer sections (./QuoteSection.svelte, ./CustomerSection.svelte)
		preRepair.itemsFor(job.maker, job.model) // the Pre-repair test section (./JobPreRepair.svelte)
	]);
	return {
		job,
		staff,
		created: event.url.searchParams.has('created'),
		symptomLabels: Object.fromEntries(symptomLabels) as Record<string, string>,
		runs,
		photos: jobPhotos,
		customerSide,
		quoteForm: await quoteActions.quoteFormFor(customerSide),
		preRepair: { items: preRepairItems, editable: preRepair.preRepairEditable.includes(job.status) },
		statusForm: await superValidate(statusAdapter, { id: 'status' }),
		assignForm: await superValidate({ technicianId: job.technicianId ?? '' }, assignAdapter, {
			id: 'assign',
			errors: false
		}),
		consentForm: await superValidate(consentAdapter, { id: 'consent' }),
		preRepairForm: await superValidate(preRepairAdapter, { id: 'preRepair' }),
		sendReportForm: await quoteActions.sendReportFormFor(),
		dataOutcomeForm: await superValidate(dataOutcomeAdapter, { id: 'dataOutcome' })
	};
};

// A string with a check, not an enum: superforms would fill a missing enum with its first status.
const statusForm = z.object({
	to: z.string().refine((v) => jobStatusSchema.safeParse(v).success, 'Choose a status.'),
	note: text('The note').trim().max(1000, 'Keep the note under 1000 characters.').default('')
});
const assignForm = z.object({
	technicianId: z.union([z.uuid('Choose a staff member.'), z.literal('')]).default('')
});
// Consent posts nothing but the button; a superform still carries its message and refusal.
const consentForm = z.object({});
// The pre-repair test is its own section (checklists/preRepair.ts), read beside an empty superform
// that carries its message and refusal, as intake reads it beside the intake schema.
const preRepairAdapter = zod4(z.object({}));
const statusAdapter = zod4(statusForm);
const assignAdapter = zod4(assignForm);
const consentAdapter = zod4(consentForm);
const dataOutcomeAdapter = zod4(dataOutcomeForm);

export const actions: Actions = {
	status: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await superValidate(event.request, statusAdapter, { id: 'status' });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const job = await jobs.transition(
				event.params.id,
				jobStatusSchema.parse(form.data.to),
				user.id,
				form.data.note
			);
			return message(form, `Moved to ${statusLabels[job.status]}.`);
		});
	},

	assign: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await superValidate(event.request, assignAdapter, { id: 'assign' });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			await jobs.assignTechnician(event.params.id, form.data.technicianId || null, user.id);
			return message(form, form.data.technicianId ? 'Assigned.' : 'Unassigned.');
		});
	},

	preRepair: async (event) => {
		const user = requireRole(event, 'technician');
		const body = await event.request.formData();
		const form = await superValidate(body, preRepairAdapter, { id: 'preRepair' });
		const pre = preRepair.fromForm(body);
		if (!pre) return setError(form, '', 'The pre-repair test was not in the form; reload the page.');
		if (!pre.success) return setError(form, '', pre.error.issues[0]?.message ?? 'Check the pre-repair test.');
		return act(form, async () => {
			await preRepair.save(event.params.id, pre.data, user.id);
			return message(form, 'Pre-repair test saved.');
		});
	},

	// ── Customer side (./customer-actions.ts) ──
	quote: async (event) => {
		const user = requireRole(event, 'technician');
		return quoteActions.saveQuote(event, user);
	},

	sendReport: async (event) => {
		const user = requireRole(event, 'technician');
		return quoteActions.sendReport(event, user);
	},

	revokeLink: async (event) => {
		const user = requireRole(event, 'technician');
		return quoteActions.revokeLink(event, user);
	},

	refund: async (event) => {
		const user = requireRole(event, 'lead');
		return quoteActions.refund(event, user);
	},

	// What became of the customer's data (src/lib/server/jobs/data-outcome.ts); runs ask on their own.
	dataOutcome: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await superValidate(event.request, dataOutcomeAdapter, { id: 'dataOutcome' });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const input = dataOutcomeInput.parse(form.data);
			const job = await recordDataOutcome(event.params.id, input, user.id);
			return message(form, `Recorded: ${dataOutcomeLabels[job.dataOutcome ?? input.outcome]}.`);
		});
	},

	consent: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await superValidate(event.request, consentAdapter, { id: 'consent' });
		return act(form, async () => {
			await jobs.recordConsent(event.params.id, user.id);
			return message(form, 'Consent to open recorded.');
		});
	}
};
