import { error, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { kebabId } from '$lib/flows/schema';
import { requireRole } from '$lib/server/guards';
import { actionFailure } from '$lib/server/http';
import * as authoring from '$lib/server/flows/authoring';
import * as flowLibrary from '$lib/server/flows/queries';
import type { Actions, PageServerLoad } from './$types';

const fromVersion = z.coerce.number().int().min(1).max(1_000_000);

/** The version a new draft starts from: ?from=N, else the newest published one. */
async function source(params: { id: string }, from: string | null) {
	const id = kebabId.safeParse(params.id);
	if (!id.success) error(404, { message: 'Flow ids are kebab-case, like restart-loop-after-liquid.' });
	const n = from === null ? null : fromVersion.safeParse(from);
	if (n && !n.success) error(400, { message: 'The version to start from must be a whole number.' });
	const version = n
		? await flowLibrary.getVersion(id.data, n.data)
		: await flowLibrary.currentPublished(id.data);
	if (!version) error(404, { message: `Flow "${id.data}" has no such published version to start from.` });
	return version;
}

/** `?step=<id>` (from flow health): the new draft's editor opens at that step, if the version has it. */
function stepQuery(url: URL, version: { definition: { steps: Record<string, unknown> } }) {
	const id = url.searchParams.get('step');
	return id !== null && Object.hasOwn(version.definition.steps, id) ? `?step=${encodeURIComponent(id)}` : '';
}

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'senior');
	const version = await source(event.params, event.url.searchParams.get('from'));
	const drafts = await flowLibrary.openDrafts(version.flowId);
	return {
		flow: { id: version.flowId, title: version.definition.title },
		version: version.version!,
		stepQuery: stepQuery(event.url, version),
		drafts: drafts.map((d) => ({
			id: d.id,
			status: d.status,
			authorName: d.authorName,
			updatedAt: d.updatedAt
		}))
	};
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, 'senior');
		const version = await source(event.params, event.url.searchParams.get('from'));
		let draftId: string;
		try {
			draftId = (await authoring.createDraft({ id: user.id, role: user.role }, { fromVersionId: version.id }))
				.id;
		} catch (e) {
			return actionFailure(e);
		}
		redirect(303, `/flows/${version.flowId}/drafts/${draftId}${stepQuery(event.url, version)}`);
	}
};
