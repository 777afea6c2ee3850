// Invented staff for server specs (not imported by the app): each with a password of their own and
// an e-mail at a .test domain, so specs sharing one database never collide.
import type { Role } from '$lib/roles';
import * as staff from './queries';

export type TestPerson = { id: string; name: string; email: string; role: Role };

/** Creates `name` (e-mail `name@domain`) with `role`; the password is `${name}-password-1`. */
export async function person(name: string, role: Role, domain = 'shop.test'): Promise<TestPerson> {
	const email = `${name.toLowerCase()}@${domain}`;
	const created = await staff.create(null, { name, email, role, password: `${name}-password-1` });
	return { id: created.id, name, email, role };
}
