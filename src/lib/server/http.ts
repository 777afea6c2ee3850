// JSON helpers shared by the API routes of every domain (jobs, runs, insights, …): zod issues in
// one shape, a 400 for bad input, and a JSON body read that answers 400 instead of throwing.
import { json } from '@sveltejs/kit';
import type { z } from 'zod';

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

/**
 * 400 with every issue. The message is `message`, or with `lead: 'first-issue'` the first issue's
 * own message (falling back to `message`), for clients that show one line.
 */
export function badRequest(
	error: z.ZodError,
	message: string,
	{ lead = 'message' }: { lead?: 'message' | 'first-issue' } = {}
) {
	const issues = issuesOf(error);
	const text = lead === 'first-issue' ? (issues[0]?.message ?? message) : message;
	return json({ message: text, issues } satisfies ApiError, { status: 400 });
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
