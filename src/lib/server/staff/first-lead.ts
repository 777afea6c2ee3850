/**
 * The shop's first lead on a fresh production database (`npm run lead:create`), where nobody can
 * sign in yet to add staff. Refused once an active lead exists: after that, leads add staff in the
 * app. The password is made here and shown once; the lead must change it at the first sign-in.
 */
import crypto from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { users } from '$lib/server/db/schema';
import { staffMember } from '$lib/schemas/staff';
import * as staff from './queries';

export const firstLeadInput = staffMember.pick({ name: true, email: true });

export class FirstLeadRefused extends Error {}

/** 20 characters from 31 without look-alikes (no i, l, o, 0, 1): 99 bits, easy to type once. */
export function temporaryPassword() {
	const alphabet = 'abcdefghjkmnpqrstuvwxyz23456789';
	const chars = Array.from({ length: 20 }, () => alphabet[crypto.randomInt(alphabet.length)]);
	return [0, 5, 10, 15].map((i) => chars.slice(i, i + 5).join('')).join('-');
}

export async function createFirstLead(input: { name: string; email: string }) {
	const parsed = firstLeadInput.safeParse(input);
	if (!parsed.success) throw new FirstLeadRefused(parsed.error.issues[0].message);
	const db = await getDb();
	const [lead] = await db
		.select({ email: users.email })
		.from(users)
		.where(and(eq(users.role, 'lead'), eq(users.disabled, false)))
		.limit(1);
	if (lead) {
		throw new FirstLeadRefused(
			`The shop already has a lead (${lead.email}). Leads add staff in the app under Staff.`
		);
	}
	const password = temporaryPassword();
	const created = await staff.create(null, {
		...parsed.data,
		role: 'lead',
		password,
		mustChangePassword: true
	});
	return { lead: created, password };
}
