import { fail, isRedirect, redirect } from '@sveltejs/kit';
import { AuthError, CredentialsSignin } from '@auth/core/errors';
import { superValidate, message } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { forwardedHeaders, signIn, TooManySignIns } from '$lib/server/auth';
import { signInForm } from '$lib/schemas/staff';
import { waitMessage } from '$lib/server/ratelimit';
import { safeNext } from '$lib/server/safe-next';
import * as staff from '$lib/server/staff/queries';
import type { Actions, PageServerLoad } from './$types';

// Public route (allow-listed): the guard here is the reverse one — signed-in users move on.
export const load: PageServerLoad = async (event) => {
	const next = safeNext(event.url.searchParams.get('next'));
	if (event.locals.user) redirect(303, next);
	return { form: await superValidate(zod4(signInForm)), next };
};

export const actions: Actions = {
	default: async (event) => {
		const form = await superValidate(event.request, zod4(signInForm));
		if (!form.valid) return fail(400, { form: withoutPassword(form) });
		const email = form.data.email.trim().toLowerCase();
		const next = safeNext(event.url.searchParams.get('next'));

		const body = new URLSearchParams({ email, password: form.data.password, redirectTo: next });
		body.set('providerId', 'credentials');
		const request = new Request(event.request.url, {
			method: 'POST',
			headers: { 'content-type': 'application/x-www-form-urlencoded', ...forwardedHeaders(event.request) },
			body
		});
		try {
			await signIn({ ...event, request });
		} catch (e) {
			// The limit, the failure count and the audit entry live in the credentials provider
			// (lib/server/auth.ts), so this page and Auth.js's own endpoint share one budget.
			if (isRedirect(e)) {
				const user = await staff.findByEmail(email);
				redirect(303, user?.mustChangePassword ? '/account?first=1' : next);
			}
			if (e instanceof CredentialsSignin && e.code === 'disabled') {
				return message(withoutPassword(form), 'This account is disabled. Ask your shop lead to enable it.', {
					status: 403
				});
			}
			if (e instanceof TooManySignIns) {
				return message(withoutPassword(form), waitMessage(event.locals.signInWait ?? 60), { status: 429 });
			}
			if (e instanceof AuthError) {
				return message(withoutPassword(form), 'That e-mail and password do not match an account.', {
					status: 400
				});
			}
			throw e;
		}
	}
};

function withoutPassword<T extends { data: { password: string } }>(form: T) {
	form.data.password = '';
	return form;
}
