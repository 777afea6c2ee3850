import { hasRole, type Role } from '$lib/roles';

export type NavItem = { href: string; label: string; role: Role; description?: string };

/**
 * The app's sections, each with the least role that may open it. The shell shows only what the
 * signed-in role may use; each route's own server guard decides access. Add a section here when
 * its route exists.
 */
export const navItems: NavItem[] = [
	{ href: '/', label: 'Today', role: 'technician' },
	{
		href: '/jobs',
		label: 'Jobs',
		role: 'technician',
		description: 'Take in a phone, find a job, move it along.'
	},
	{
		href: '/flows',
		label: 'Library',
		role: 'technician',
		description: 'The shop’s diagnostic flows, read step by step.'
	},
	{
		href: '/staff',
		label: 'Staff',
		role: 'lead',
		description: 'Accounts, roles and passwords of the shop’s staff.'
	},
	{
		href: '/outbox',
		label: 'Outbox',
		role: 'lead',
		description: 'Every e-mail sent to customers: queued, sent or failed, and why.'
	},
	{
		href: '/insights',
		label: 'Insights',
		role: 'lead',
		description: 'Which verdicts come up, when, how long diagnosis takes and whether verdicts held.'
	},
	{
		href: '/settings',
		label: 'Settings',
		role: 'lead',
		description: 'Shop name, currency and tax, report link lifetime, cautions and terms.'
	},
	{
		href: '/help',
		label: 'Help',
		role: 'technician',
		description: 'Short guides per role, the cautions and how to write a good flow.'
	}
];

export function navFor(role: Role) {
	return navItems.filter((item) => hasRole(role, item.role));
}

export function isCurrent(href: string, pathname: string) {
	return href === '/' ? pathname === '/' : pathname === href || pathname.startsWith(href + '/');
}
