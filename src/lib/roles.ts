/** Roles are cumulative: each one can do everything the ones before it can. */
export const roles = ['technician', 'senior', 'lead'] as const;
export type Role = (typeof roles)[number];

export function hasRole(actual: Role, needed: Role): boolean {
	return roles.indexOf(actual) >= roles.indexOf(needed);
}

export const roleLabels: Record<Role, string> = {
	technician: 'Technician',
	senior: 'Senior technician',
	lead: 'Shop lead'
};
