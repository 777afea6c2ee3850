import { error, fail, redirect } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import * as flowLibrary from '$lib/server/flows/queries';
import type { Actions, PageServerLoad } from './$types';
import { FlowAuthoringError, statusOf } from './errors';
import { draftParams } from './schema';

async function draftOf(params: unknown) {
	const p = draftParams.safeParse(params);
	if (!p.success) error(404, { message: 'No such draft.' });
	const draft = await flowLibrary.getVersionById(p.data.draftId);
	if (!draft || draft.flowId !== p.data.id) error(404, { message: `Flow "${p.data.id}" has no such draft.` });
	return draft;
}

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'senior');
	const draft = await draftOf(event.params);
	const [flow, basedOn] = await Promise.all([
		flowLibrary.getFlow(draft.flowId),
		draft.basedOnId ? flowLibrary.getVersionById(draft.basedOnId) : undefined
	]);
	return {
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
		basedOn: basedOn?.version ?? null
	};
};

export const actions: Actions = {
	submit: async (event) => {
		const user = requireRole(event, 'senior');
		const draft = await draftOf(event.params);
		try {
			await authoring.submit({ id: user.id, role: user.role }, draft.id);
		} catch (e) {
			if (!(e instanceof FlowAuthoringError)) throw e;
			return fail(statusOf(e), { message: e.message, problems: e.problems.length });
		}
		redirect(303, `/flows/${draft.flowId}?submitted=1`);
	}
};
