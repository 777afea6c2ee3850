import { error, fail } from '@sveltejs/kit';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import { actionFailure } from '$lib/server/http';
import * as jobs from '$lib/server/jobs/queries';
import { jobRunsSection } from './runs-section';
import * as symptomCatalogue from '$lib/server/symptoms/queries';
import * as photos from '$lib/server/photos/queries';
import { jobStatusSchema, statusLabels } from '$lib/domain/jobStatus';
import { customerSection } from './customer-section';
import * as quoteActions from './customer-actions';
import { recordDataOutcome } from '$lib/server/jobs/data-outcome';
import { dataOutcomeInput } from '$lib/schemas/data-outcome';
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
		preRepair: { items: preRepairItems, editable: preRepair.preRepairEditable.includes(job.status) }
	};
};

const statusForm = z.object({
	to: jobStatusSchema,
	note: text('The note').trim().max(1000, 'Keep the note under 1000 characters.').default('')
});
const assignForm = z.object({ technicianId: z.union([z.uuid(), z.literal('')]) });

/** Each action answers `{ action, ok, message }` so the page can say what happened beside the control. */
function refused(action: string, status: number, message: string) {
	return fail(status, { action, ok: false, message });
}

export const actions: Actions = {
	status: async (event) => {
		const user = requireRole(event, 'technician');
		const parsed = statusForm.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return refused('status', 400, parsed.error.issues[0]?.message ?? 'Choose a status.');
		try {
			const job = await jobs.transition(event.params.id, parsed.data.to, user.id, parsed.data.note);
			return { action: 'status', ok: true, message: `Moved to ${statusLabels[job.status]}.` };
		} catch (e) {
			return actionFailure(e, { action: 'status', ok: false });
		}
	},

	assign: async (event) => {
		const user = requireRole(event, 'technician');
		const parsed = assignForm.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return refused('assign', 400, 'Choose a staff member.');
		try {
			await jobs.assignTechnician(event.params.id, parsed.data.technicianId || null, user.id);
			return { action: 'assign', ok: true, message: parsed.data.technicianId ? 'Assigned.' : 'Unassigned.' };
		} catch (e) {
			return actionFailure(e, { action: 'assign', ok: false });
		}
	},

	preRepair: async (event) => {
		const user = requireRole(event, 'technician');
		const parsed = preRepair.fromForm(await event.request.formData());
		if (!parsed)
			return refused('preRepair', 400, 'The pre-repair test was not in the form; reload the page.');
		if (!parsed.success)
			return refused('preRepair', 400, parsed.error.issues[0]?.message ?? 'Check the pre-repair test.');
		try {
			await preRepair.save(event.params.id, parsed.data, user.id);
			return { action: 'preRepair', ok: true, message: 'Pre-repair test saved.' };
		} catch (e) {
			return actionFailure(e, { action: 'preRepair', ok: false });
		}
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
		const form = Object.fromEntries(await event.request.formData());
		const parsed = dataOutcomeInput.safeParse(form);
		const back = { outcome: String(form.outcome ?? ''), note: String(form.note ?? '') };
		if (!parsed.success)
			return fail(400, {
				action: 'dataOutcome',
				ok: false,
				message: parsed.error.issues[0].message,
				...back
			});
		try {
			const job = await recordDataOutcome(event.params.id, parsed.data, user.id);
			return {
				action: 'dataOutcome',
				ok: true,
				message: `Recorded: ${dataOutcomeLabels[job.dataOutcome ?? parsed.data.outcome]}.`
			};
		} catch (e) {
			return actionFailure(e, { action: 'dataOutcome', ok: false });
		}
	},

	consent: async (event) => {
		const user = requireRole(event, 'technician');
		try {
			await jobs.recordConsent(event.params.id, user.id);
			return { action: 'consent', ok: true, message: 'Consent to open recorded.' };
		} catch (e) {
			return actionFailure(e, { action: 'consent', ok: false });
		}
	}
};
