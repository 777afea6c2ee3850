import { error, fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { checkFlow } from '$lib/flows/check';
import { diffVersions } from '$lib/flows/diff';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import * as flowLibrary from '$lib/server/flows/queries';
import * as staff from '$lib/server/staff/queries';
import type { Actions, PageServerLoad } from './$types';
import { actionFailure, formFailure } from '$lib/server/http';
import { draftParams, sendBackForm } from './schema';

async function draftOf(params: unknown) {
	const p = draftParams.safeParse(params);
	if (!p.success) error(404, { message: 'No such draft.' });
	const draft = await flowLibrary.getVersionById(p.data.draftId);
	if (!draft || draft.flowId !== p.data.id) error(404, { message: `Flow "${p.data.id}" has no such draft.` });
	return draft;
}

/** After an import: the file is a draft now; its problems show in the editor. */
function importedNotice(n: string | null): string | null {
	if (n === null) return null;
	const count = Number(n);
	if (!Number.isInteger(count) || count < 0) return null;
	return count === 0
		? 'Imported: the file passes the check. Review it here, then submit it.'
		: `Imported with ${count} problem${count === 1 ? '' : 's'}, listed below and marked on the steps. Fix them here, then submit.`;
}

function stepOf(id: string | null, steps: Record<string, unknown>): string | null {
	return id !== null && Object.hasOwn(steps, id) ? id : null;
}

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'senior');
	const draft = await draftOf(event.params);
	const inReview = draft.status === 'in-review';
	const [flow, basedOn, refusal, author] = await Promise.all([
		flowLibrary.getFlow(draft.flowId),
		draft.basedOnId ? flowLibrary.getVersionById(draft.basedOnId) : undefined,
		inReview ? authoring.reviewRefusal({ id: user.id, role: user.role }, draft.id) : null,
		draft.authorId ? staff.findById(draft.authorId) : undefined
	]);
	return {
		review: inReview
			? {
					refusal,
					author: author?.name ?? null,
					submittedAt: draft.submittedAt,
					diff: basedOn ? diffVersions(basedOn.definition, draft.definition) : null,
					stats: checkFlow(draft.definition).stats
				}
			: null,
		flow: { id: draft.flowId, title: flow?.title ?? draft.definition.title },
		draft: {
			id: draft.id,
			status: draft.status,
			version: draft.version,
			revision: draft.revision,
			reviewComment: draft.reviewComment,
			updatedAt: draft.updatedAt
		},
		definition: draft.definition,
		basedOn: basedOn?.version ?? null,
		// `?step=<id>` opens the editor at that step (links from flow health); unknown ids are ignored.
		step: stepOf(event.url.searchParams.get('step'), draft.definition.steps),
		imported: importedNotice(event.url.searchParams.get('imported'))
	};
};

export const actions: Actions = {
	submit: async (event) => {
		const user = requireRole(event, 'senior');
		const draft = await draftOf(event.params);
		try {
			await authoring.submit({ id: user.id, role: user.role }, draft.id);
		} catch (e) {
			return actionFailure(e, { problems: authoring.problemsOf(e).length });
		}
		redirect(303, `/flows/${draft.flowId}?submitted=1`);
	},
	approve: async (event) => {
		const user = requireRole(event, 'senior');
		const draft = await draftOf(event.params);
		let version: number | null;
		try {
			version = (await authoring.approve({ id: user.id, role: user.role }, draft.id)).version;
		} catch (e) {
			return actionFailure(e, { problems: authoring.problemsOf(e).length });
		}
		redirect(303, `/flows/${draft.flowId}?published=${version}`);
	},
	sendBack: async (event) => {
		const user = requireRole(event, 'senior');
		const draft = await draftOf(event.params);
		const form = await superValidate(event.request, zod4(sendBackForm), { id: 'send-back' });
		if (!form.valid) return fail(400, { form });
		try {
			await authoring.sendBack({ id: user.id, role: user.role }, draft.id, form.data.comment);
		} catch (e) {
			return formFailure(form, e);
		}
		redirect(303, `/flows/${draft.flowId}?sentBack=1`);
	}
};
