import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { kebabId } from '$lib/flows/schema';
import { hasRole } from '$lib/roles';
import { requireRole, requireUser } from '$lib/server/guards';
import { act } from '$lib/server/http';
import { retireVersion } from '$lib/schemas/flows';
import * as authoring from '$lib/server/flows/authoring';
import * as flowLibrary from '$lib/server/flows/queries';
import * as staff from '$lib/server/staff/queries';
import type { Actions, PageServerLoad } from './$types';
import { collapseSaves } from './history';

/** What the review actions redirect here to say. */
function notice(q: URLSearchParams): string | null {
	const published = z.coerce.number().int().min(1).safeParse(q.get('published'));
	if (q.has('published') && published.success)
		return `Version ${published.data} is published: new runs start on it; runs under way finish on the version they started on.`;
	if (q.has('sentBack')) return 'The draft is back with its author, with your comment.';
	if (q.has('submitted')) return 'The draft is submitted: another senior or a lead reviews it.';
	return null;
}

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const id = kebabId.safeParse(event.params.id);
	if (!id.success) error(404, { message: 'Flow ids are kebab-case, like restart-loop-after-liquid.' });
	const senior = hasRole(user.role, 'senior');
	const [flow, versions, current, drafts, audit] = await Promise.all([
		flowLibrary.getFlow(id.data),
		flowLibrary.publishedVersions(id.data),
		flowLibrary.currentPublished(id.data),
		senior ? flowLibrary.openDrafts(id.data) : [],
		senior ? staff.auditFor('flow', id.data, 300) : []
	]);
	// A flow that was never published does not exist for technicians.
	if (!flow || (!senior && versions.length === 0))
		error(404, { message: `There is no flow "${id.data}" in the library.` });
	return {
		flow,
		versions,
		drafts,
		audit: collapseSaves(audit).slice(0, 40),
		notice: notice(event.url.searchParams),
		summary: current?.definition.summary ?? null,
		current: current?.version ?? null,
		seesDrafts: senior
	};
};

const retireAdapter = zod4(retireVersion);

export const actions: Actions = {
	retire: async (event) => {
		const user = requireRole(event, 'senior');
		const body = await event.request.formData();
		const form = await superValidate(body, retireAdapter, {
			id: `retire-${String(body.get('version') ?? '')}`
		});
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const retired = await authoring.retire(user, event.params.id, form.data.version);
			return message(
				form,
				`Version ${retired.version} is retired: no new runs start on it; runs under way finish on it.`
			);
		});
	}
};
