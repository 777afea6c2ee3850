import { json } from '@sveltejs/kit';
import type { z } from 'zod';
import { JobRuleError } from './queries';

/** Dates become ISO strings on the wire; the API's response types say so. */
export type Jsonify<T> = T extends Date
	? string
	: T extends readonly (infer U)[]
		? Jsonify<U>[]
		: T extends object
			? { [K in keyof T]: Jsonify<T[K]> }
			: T;

export type ApiIssue = { path: string; message: string };
export type ApiError = { message: string; issues?: ApiIssue[] };

export function issuesOf(error: z.ZodError): ApiIssue[] {
	return error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
}

export function badRequest(error: z.ZodError, message = 'Some fields need attention.') {
	return json({ message, issues: issuesOf(error) } satisfies ApiError, { status: 400 });
}

/** Reads a JSON body, answering 400 (not 500) for a body that is not JSON. */
export async function readJson(
	request: Request
): Promise<{ ok: true; body: unknown } | { ok: false; response: Response }> {
	try {
		return { ok: true, body: await request.json() };
	} catch {
		return {
			ok: false,
			response: json({ message: 'The body must be JSON.' } satisfies ApiError, { status: 400 })
		};
	}
}

/** A rule refusal as an HTTP answer: 404 for a missing job, 409 for a move the workflow forbids. */
export function ruleFailure(e: JobRuleError) {
	const status = e.code === 'not-found' ? 404 : e.code === 'invalid-transition' ? 409 : 400;
	const issues = e.field ? [{ path: e.field, message: e.message }] : undefined;
	return json({ message: e.message, issues } satisfies ApiError, { status });
}
