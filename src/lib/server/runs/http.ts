import { json } from '@sveltejs/kit';
import type { z } from 'zod';
import type { RunState } from '$lib/runs/types';
import { badRequest as shared, type ApiError } from '$lib/server/http';
import { RunRuleError } from './queries';

export { readJson } from '$lib/server/http';

export type RunApiError = ApiError & { code?: string; state?: RunState };

/** 400 led by the first issue's message (the run screen shows one line). */
export function badRequest(error: z.ZodError, message = 'The request needs attention.') {
	return shared(error, message, { lead: 'first-issue' });
}

/** A rule refusal as JSON with its status; a 409 carries the run's current state. */
export function refusal(e: RunRuleError) {
	return json({ message: e.message, code: e.code, state: e.state } satisfies RunApiError, {
		status: e.status
	});
}

/** Runs `work`, turning a rule refusal into its HTTP answer. */
export async function answer(work: () => Promise<Response>): Promise<Response> {
	try {
		return await work();
	} catch (e) {
		if (e instanceof RunRuleError) return refusal(e);
		throw e;
	}
}
