import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { kebabId } from '$lib/flows/schema';
import { requireRole } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import * as flowHealth from '$lib/server/flow-health/queries';
import { STANDOUT } from '$lib/server/flow-health/thresholds';
import type { PageServerLoad } from './$types';

const versionParam = z.coerce.number().int().min(1).max(1_000_000);

/** The flow, its numbered versions with their finished runs, and the version to show. */
export const load: PageServerLoad = async (event) => {
	requireRole(event, 'senior');
	const id = kebabId.safeParse(event.params.id);
	if (!id.success) error(404, { message: 'Flow ids are kebab-case, like restart-loop-after-liquid.' });
	const raw = event.url.searchParams.get('version');
	const asked = raw === null ? null : versionParam.safeParse(raw);
	if (asked && !asked.success)
		error(400, { message: 'The version must be a whole number, e.g. ?version=3.' });
	const [flow, versions, runs] = await Promise.all([
		flowLibrary.getFlow(id.data),
		flowLibrary.publishedVersions(id.data),
		flowHealth.runsPerVersion(id.data)
	]);
	if (!flow) error(404, { message: `There is no flow "${id.data}" in the library.` });
	const numbered = versions.flatMap((v) =>
		v.version === null ? [] : [{ version: v.version, status: v.status, runs: runs.get(v.version) ?? 0 }]
	);
	// By default the version new runs start on (the newest published), else the newest there is.
	const current = numbered.find((v) => v.status === 'published')?.version ?? null;
	const version = asked?.data ?? current ?? numbered[0]?.version ?? null;
	if (asked && !numbered.some((v) => v.version === asked.data))
		error(404, { message: `Flow "${id.data}" has no published version ${asked.data}.` });
	return {
		flow: { id: flow.id, title: flow.title },
		versions: numbered,
		current,
		version,
		thresholds: STANDOUT
	};
};
