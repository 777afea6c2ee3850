import { hasRole } from '$lib/roles';
import { requireUser } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import * as catalogue from '$lib/server/symptoms/queries';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const senior = hasRole(user.role, 'senior');
	const [flows, awaitingReview, withoutFlow] = await Promise.all([
		flowLibrary.listLibrary(user.role),
		senior ? flowLibrary.awaitingReview() : [],
		catalogue.withoutFlow()
	]);
	// Files refused at start-up are the authors' business; technicians only see what is published.
	const report = hasRole(user.role, 'senior') ? flowLibrary.lastImport() : undefined;
	const refused = (report?.refused ?? []).map((r) => ({
		file: r.file,
		problems: r.problems.map((p) => flowLibrary.formatProblem(r.file, p))
	}));
	return {
		flows,
		awaitingReview,
		// What to write next: offered symptoms no published flow covers, most jobs first.
		withoutFlow: withoutFlow.map((s) => ({ code: s.code, label: s.label, group: s.group, jobs: s.jobs })),
		refused,
		importError: report?.error ?? null,
		seesDrafts: hasRole(user.role, 'senior')
	};
};
