import { error } from '@sveltejs/kit';
import { checkFlow } from '$lib/flows/check';
import { versionRef } from '$lib/schemas/flows';
import { requireUser } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireUser(event);
	const ref = versionRef.safeParse(event.params);
	if (!ref.success) error(404, { message: ref.error.issues[0]?.message ?? 'No such version.' });
	// Only numbered versions have this address, and only published (or since retired) ones are numbered.
	const [version, current] = await Promise.all([
		flowLibrary.getVersion(ref.data.id, ref.data.version),
		flowLibrary.currentPublished(ref.data.id)
	]);
	if (!version)
		error(404, { message: `Flow "${ref.data.id}" has no published version ${ref.data.version}.` });
	const { stats } = checkFlow(version.definition);
	return {
		version: {
			id: version.id,
			flowId: version.flowId,
			version: version.version!,
			status: version.status,
			checksum: version.checksum,
			changelog: version.changelog,
			publishedAt: version.publishedAt,
			retiredAt: version.retiredAt
		},
		definition: version.definition,
		stats,
		current: current?.version ?? null
	};
};
