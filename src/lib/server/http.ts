// How the server answers: JSON for API routes and failures for form actions, both from the one
// refusal of the domain layer (RuleError in ./errors) and from zod issues. An unexpected error is
// logged here and answered with a 500 that says nothing of its cause.
import { fail, isHttpError, isRedirect, json, type ActionFailure } from '@sveltejs/kit';
import { setError, type SuperValidated } from 'sveltekit-superforms';
import type { z } from 'zod';
import { RuleError } from './errors';

export { RuleError, isRuleError } from './errors';

/** Dates become ISO strings on the wire; the API's response types say so. */
export type Jsonify<T> = T extends Date
	? string
	: T extends readonly (infer U)[]
		? Jsonify<U>[]
		: T extends object
			? { [K in keyof T]: Jsonify<T[K]> }
			: T;

export type ApiIssue = { path: string; message: string };
/**
 * Every refusal's JSON body: the sentence to show, a stable code, one issue per field. A rule's
 * other details ride along beside them (a run's `state`, a flow's `problems` and `current`).
 */
export type ApiError = { message: string; code?: string; issues?: ApiIssue[] };

/** Shown for a fault that is not a rule: the cause goes to the log, never to the client. */
export const INTERNAL_MESSAGE =
	'Something went wrong on our side and the request did not finish. Try again; if it keeps happening, tell the shop lead.';

export function issuesOf(error: z.ZodError): ApiIssue[] {
	return error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
}

/**
 * 400 with every issue. The message is `message`, or with `lead: 'first-issue'` the first issue's
 * own message (falling back to `message`), for clients that show one line.
 */
export function badRequest(
	error: z.ZodError,
	message = 'Some fields need attention.',
	{ lead = 'message' }: { lead?: 'message' | 'first-issue' } = {}
) {
	const issues = issuesOf(error);
	const text = lead === 'first-issue' ? (issues[0]?.message ?? message) : message;
	return json({ message: text, code: 'bad-request', issues } satisfies ApiError, { status: 400 });
}

/** 400 led by the first issue's own message, for clients that show one line (the run screen, photos). */
export const badRequestFirst = (error: z.ZodError) =>
	badRequest(error, 'The request needs attention.', { lead: 'first-issue' });

/** Reads a JSON body, answering 400 (not 500) for a body that is not JSON. */
export async function readJson(
	request: Request
): Promise<{ ok: true; body: unknown } | { ok: false; response: Response }> {
	try {
		return { ok: true, body: await request.json() };
	} catch {
		return {
			ok: false,
			response: json({ message: 'The body must be JSON.', code: 'bad-request' } satisfies ApiError, {
				status: 400
			})
		};
	}
}

/** The status and JSON body of a refusal; SvelteKit's own `error()`/`redirect()` go on up untouched. */
export function refusalOf(e: unknown): { status: number; body: ApiError & Record<string, unknown> } {
	if (isHttpError(e) || isRedirect(e)) throw e;
	if (e instanceof RuleError) {
		const { field, ...rest } = e.details;
		const body: ApiError & Record<string, unknown> = { message: e.message, code: e.code, ...rest };
		if (field) body.issues = [{ path: field, message: e.message }];
		return { status: e.status, body };
	}
	console.error('Unexpected error while answering a request:', e);
	return { status: 500, body: { message: INTERNAL_MESSAGE, code: 'internal' } };
}

/** An API route's answer to an error: a RuleError's status and body, or a bare 500. */
export function errorResponse(e: unknown): Response {
	const { status, body } = refusalOf(e);
	return json(body, { status });
}

/** Runs an API route's work, answering any error as `errorResponse` does. */
export async function answer(work: () => Promise<Response>): Promise<Response> {
	try {
		return await work();
	} catch (e) {
		return errorResponse(e);
	}
}

type AnyForm = SuperValidated<Record<string, unknown>, unknown, Record<string, unknown>>;

/**
 * A superforms action's answer to an error: the message beside its field when the form has that
 * field, else as the form's own error, with the refusal's status. The form keeps what was typed.
 */
export function formFailure<F extends AnyForm>(form: F, e: unknown): ActionFailure<{ form: F }> {
	const { status, body } = refusalOf(e);
	const field = e instanceof RuleError ? e.field : undefined;
	const path = field && field.split(/[.[]/)[0] in form.data ? field : '';
	// The path is checked against the form's data above; superforms' path type cannot see that.
	return setError(form, path as '', body.message, { status: status as 400 }) as ActionFailure<{ form: F }>;
}

/** Runs a superforms action's work; an error becomes `formFailure`. */
export async function act<F extends AnyForm, R>(form: F, work: () => Promise<R>) {
	try {
		return await work();
	} catch (e) {
		return formFailure(form, e);
	}
}

/**
 * A plain form action's answer to an error (one without a superform, such as a row button):
 * `fail(status, { message, code, field?, ...extra })`, with `extra` carrying what the page needs
 * to put the message in the right place and keep what was typed.
 */
export function actionFailure<E extends Record<string, unknown>>(e: unknown, extra?: E) {
	const { status, body } = refusalOf(e);
	const field = e instanceof RuleError ? e.field : undefined;
	return fail(status, { ...(extra as E), message: body.message, code: body.code ?? 'internal', field });
}
