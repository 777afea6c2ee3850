import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import { hasRole, type Role } from '$lib/roles';

type Guarded = Pick<RequestEvent, 'locals' | 'url'> & { route: { id: string | null } };

function isApi(event: Guarded) {
	return event.route.id?.startsWith('/api') ?? event.url.pathname.startsWith('/api');
}

/**
 * First statement of every server load, action and API handler outside the public allow-list.
 * Pages send the signed-out visitor to the sign-in page; API routes answer 401.
 */
export function requireUser(event: Guarded) {
	const user = event.locals.user;
	if (user) return user;
	if (isApi(event)) error(401, { message: 'Sign in first.' });
	const next = event.url.pathname + event.url.search;
	redirect(303, `/signin?next=${encodeURIComponent(next)}`);
}

export function requireRole(event: Guarded, role: Role) {
	const user = requireUser(event);
	if (!hasRole(user.role, role)) {
		error(403, { message: `This needs the ${role} role; you are signed in as ${user.role}.` });
	}
	return user;
}
