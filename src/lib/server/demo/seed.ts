import * as staff from '$lib/server/staff/queries';
import * as shop from '$lib/server/settings/queries';
import { env } from '$lib/server/env';

/** The invented demo shop and its staff. Every name here is made up. */
export const demoShop = { name: 'Low Tide Phone Clinic' };
export const demoStaff = [
	{ name: 'Ilse Varga', email: 'lead@tidemark.test', role: 'lead' },
	{ name: 'Tomas Ridley', email: 'senior@tidemark.test', role: 'senior' },
	{ name: 'Nadia Fenwick', email: 'tech@tidemark.test', role: 'technician' }
] as const;

export function demoPassword() {
	return env().DEMO_PASSWORD;
}

/** Seeds the demo shop into an empty database; does nothing when any staff member exists. */
export async function seedDemo() {
	if ((await staff.count()) > 0) return false;
	await shop.setShop(demoShop);
	const password = demoPassword();
	for (const member of demoStaff) {
		await staff.create(null, { ...member, password, mustChangePassword: false });
	}
	console.log(`[demo] seeded ${demoShop.name} with ${demoStaff.length} staff`);
	return true;
}
