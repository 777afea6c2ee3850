import { json } from '@sveltejs/kit';
import { z } from 'zod';
import type { RequestHandler } from './$types';
import { requireRole } from '$lib/server/guards';
import * as runs from '$lib/server/runs/queries';
import * as insights from '$lib/server/insights/queries';
import type { StepHistory } from '$lib/insights/types';

export type StepHistoryResponse = StepHistory;

const query = z.object({
	step: z
		.string()
		.trim()
		.min(1, 'Name the step.')
		.max(200)
		.regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'A step id is kebab-case, e.g. power-on-as-received.')
		.optional()
});

/**
 * GET /api/runs/:id/history?step= — what past runs of the same flow (any version) that answered
 * this step ended in; the run's current step when `step` is left out. History, not advice.
 */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'technician');
	const parsed = query.safeParse({ step: event.url.searchParams.get('step') ?? undefined });
	if (!parsed.success) {
		const issues = parsed.error.issues.map((i) => ({
			path: i.path.map(String).join('.'),
			message: i.message
		}));
		return json({ message: `step: ${issues[0].message}`, issues }, { status: 400 });
	}
	const run = await runs.get(event.params.id);
	if (!run) return json({ message: 'No run with this id.' }, { status: 404 });
	const history = await insights.stepHistory(run.flow.id, parsed.data.step ?? run.currentStep);
	return json(history satisfies StepHistoryResponse);
};
