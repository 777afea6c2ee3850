import { redirect } from '@sveltejs/kit';
import { signOut } from '$lib/server/auth';
import * as staff from '$lib/server/staff/queries';
import type { Actions, PageServerLoad } from './$types';

// Public (allow-listed): signing out must work for anyone holding a session cookie.
export const load: PageServerLoad = async () => redirect(303, '/');

export const actions: Actions = {
	default: async (event) => {
		// The token is stateless: clearing the cookie alone would leave a copied token working.
		// Bumping the session generation ends every session of this member, on every device.
		if (event.locals.user) await staff.endSessions(event.locals.user.id);
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
