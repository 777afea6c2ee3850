import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import { issuesOf } from '$lib/server/http';
import * as flowHealth from '$lib/server/flow-health/queries';
import { healthQuery } from '$lib/flow-health/schema';
import type { FlowHealthResponse } from '$lib/flow-health/types';

export type { FlowHealthResponse };

/**
 * GET /api/flows/:id/health?version=N — per step of version N: answers, revisions, time against
 * the expected minutes, abandons and overturned verdicts, with the reasons a step stands out.
 * Seniors and leads.
 */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'senior');
	const parsed = healthQuery.safeParse({
		id: event.params.id,
		version: event.url.searchParams.get('version') ?? undefined
	});
	if (!parsed.success) {
		const issues = issuesOf(parsed.error);
		return json({ message: `${issues[0].path}: ${issues[0].message}`, issues }, { status: 400 });
	}
	const health = await flowHealth.forVersion(parsed.data.id, parsed.data.version);
	if (!health)
		return json(
			{ message: `Flow "${parsed.data.id}" has no published version ${parsed.data.version}.` },
			{ status: 404 }
		);
	return json({ health } satisfies FlowHealthResponse);
};
