import { json } from '@sveltejs/kit';
import type { z } from 'zod';
import type { RunState } from '$lib/runs/types';
import { RunRuleError } from './queries';

export type RunApiError = {
	message: string;
	code?: string;
	issues?: { path: string; message: string }[];
	state?: RunState;
};

export function badRequest(error: z.ZodError, message = 'The request needs attention.') {
	const issues = error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
	return json({ message: issues[0]?.message ?? message, issues } satisfies RunApiError, { status: 400 });
}

/** Reads a JSON body, answering 400 (not 500) for one that is not JSON. */
export async function readJson(
	request: Request
): Promise<{ ok: true; body: unknown } | { ok: false; response: Response }> {
	try {
		return { ok: true, body: await request.json() };
	} catch {
		return {
			ok: false,
			response: json({ message: 'The body must be JSON.' } satisfies RunApiError, { status: 400 })
		};
	}
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
