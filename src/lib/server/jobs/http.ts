import { json } from '@sveltejs/kit';
import type { z } from 'zod';
import { badRequest as shared, type ApiError } from '$lib/server/http';
import { JobRuleError } from './queries';

export { issuesOf, readJson, type ApiError, type ApiIssue, type Jsonify } from '$lib/server/http';

export function badRequest(error: z.ZodError, message = 'Some fields need attention.') {
	return shared(error, message);
}

/**
 * A rule refusal as an HTTP answer: 404 for a missing job, 409 for a move the workflow forbids or
 * the ready gate holds back (items not tested without a reason).
 */
export function ruleFailure(e: JobRuleError) {
	const status =
		e.code === 'not-found' ? 404 : e.code === 'invalid-transition' || e.code === 'untested' ? 409 : 400;
	const issues = e.field ? [{ path: e.field, message: e.message }] : undefined;
	return json({ message: e.message, issues } satisfies ApiError, { status });
}
