import type { Handle } from '@sveltejs/kit';
import * as staff from '$lib/server/staff/queries';

/**
 * Fills locals.user from the session. The user row is re-read on every request, so a disabled
 * account or a changed role counts at once. This hook only fills locals; every server entry point
 * still calls requireUser / requireRole itself.
 */
export const userHandle: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	const session = await event.locals.auth();
	const id = session?.user?.id;
	if (id) {
		const user = await staff.findById(id);
		if (user && !user.disabled) {
			event.locals.user = { id: user.id, name: user.name, email: user.email, role: user.role };
		}
	}
	return resolve(event);
};
