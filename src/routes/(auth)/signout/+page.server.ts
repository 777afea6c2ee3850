import { redirect } from '@sveltejs/kit';
import { signOut } from '$lib/server/auth';
import type { Actions, PageServerLoad } from './$types';

// Public (allow-listed): signing out must work for anyone holding a session cookie.
export const load: PageServerLoad = async () => redirect(303, '/');

export const actions: Actions = {
	default: async (event) => {
		await signOut({
			...event,
			request: new Request(event.request.url, {
				method: 'POST',
				headers: event.request.headers,
				body: new URLSearchParams({ redirectTo: '/signin' })
			})
		});
	}
};
