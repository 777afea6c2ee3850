import { error } from '@sveltejs/kit';
import { kebabId } from '$lib/flows/schema';
import { hasRole } from '$lib/roles';
import { requireUser } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import * as staff from '$lib/server/staff/queries';
import type { PageServerLoad } from './$types';

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
		senior ? staff.auditFor('flow', id.data, 30) : []
	]);
	// A flow that was never published does not exist for technicians.
	if (!flow || (!senior && versions.length === 0))
		error(404, { message: `There is no flow "${id.data}" in the library.` });
	return {
		flow,
		versions,
		drafts,
		audit,
		summary: current?.definition.summary ?? null,
		current: current?.version ?? null,
		seesDrafts: senior
	};
};
