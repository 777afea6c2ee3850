import { error, isActionFailure, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { RuleError } from './errors';
import { act, actionFailure, answer, errorResponse, formFailure, INTERNAL_MESSAGE } from './http';

// A fault whose text must never reach the client: it names a table and a secret-looking value.
const fault = () => new Error('relation "users" violates constraint; password=hunter2');

const schema = z.object({ email: z.string(), note: z.string() });
async function typedForm() {
	const body = new FormData();
	body.set('email', 'ana@example.test');
	body.set('note', 'what was typed');
	return superValidate(body, zod4(schema));
}

type Failure = ReturnType<typeof formFailure<Awaited<ReturnType<typeof typedForm>>>>;

afterEach(() => vi.restoreAllMocks());

describe('API answers', () => {
	it('answers a RuleError with its status, code, message, field issue and details', async () => {
		const res = errorResponse(
			new RuleError(409, 'stale-step', 'This run has moved on.', {
				field: 'stepId',
				state: { currentStep: 'b' }
			})
		);
		expect(res.status).toBe(409);
		expect(await res.json()).toEqual({
			message: 'This run has moved on.',
			code: 'stale-step',
			issues: [{ path: 'stepId', message: 'This run has moved on.' }],
			state: { currentStep: 'b' }
		});
	});

	it('answers an unexpected error with a 500 that says nothing of its cause, and logs the cause', async () => {
		const log = vi.spyOn(console, 'error').mockImplementation(() => {});
		const res = await answer(async () => {
			throw fault();
		});
		expect(res.status).toBe(500);
		const text = await res.text();
		expect(JSON.parse(text)).toEqual({ message: INTERNAL_MESSAGE, code: 'internal' });
		expect(text).not.toMatch(/users|hunter2|constraint/);
		expect(String(log.mock.calls[0]?.[1])).toMatch(/hunter2/);
	});

	it("passes the work's own answer through, and lets SvelteKit's error() and redirect() go on up", async () => {
		expect((await answer(async () => new Response('ok', { status: 201 }))).status).toBe(201);
		await expect(answer(async () => error(404, 'gone'))).rejects.toMatchObject({ status: 404 });
		await expect(answer(async () => redirect(303, '/'))).rejects.toMatchObject({ status: 303 });
	});
});

describe('form action answers', () => {
	it('puts a RuleError beside its field with its status, keeping what was typed', async () => {
		const form = await typedForm();
		const out = formFailure(form, new RuleError(400, 'exists', 'That address is taken.', { field: 'email' }));
		expect(out.status).toBe(400);
		expect(out.data.form.errors.email).toEqual(['That address is taken.']);
		expect(out.data.form.valid).toBe(false);
		expect(out.data.form.data).toEqual({ email: 'ana@example.test', note: 'what was typed' });
	});

	it("makes a RuleError about no field of the form the form's own error", async () => {
		const out = await act(await typedForm(), async () => {
			throw new RuleError(409, 'closed', 'This job is closed.', { field: 'status' });
		});
		expect(isActionFailure(out)).toBe(true);
		const failure = out as Failure;
		expect(failure.status).toBe(409);
		expect(failure.data.form.errors._errors).toEqual(['This job is closed.']);
		expect(failure.data.form.errors).not.toHaveProperty('status');
	});

	it('answers an unexpected error with a 500 and the plain message, on a superform and a plain action', async () => {
		vi.spyOn(console, 'error').mockImplementation(() => {});
		const out = await act(await typedForm(), async () => {
			throw fault();
		});
		expect(isActionFailure(out)).toBe(true);
		const failure = out as Failure;
		expect(failure.status).toBe(500);
		expect(failure.data.form.errors._errors).toEqual([INTERNAL_MESSAGE]);
		expect(failure.data.form.data.note).toBe('what was typed');
		expect(JSON.stringify(failure.data)).not.toMatch(/hunter2|users/);

		const plain = actionFailure(fault(), { action: 'quote', ok: false });
		expect(plain.status).toBe(500);
		expect(plain.data).toEqual({
			action: 'quote',
			ok: false,
			message: INTERNAL_MESSAGE,
			code: 'internal',
			field: undefined
		});
	});

	it('answers a RuleError on a plain action with its status, message, code and field', () => {
		const out = actionFailure(new RuleError(404, 'not-found', 'No job with this id.'), { action: 'status' });
		expect(out.status).toBe(404);
		expect(out.data).toMatchObject({ action: 'status', message: 'No job with this id.', code: 'not-found' });
	});
});
