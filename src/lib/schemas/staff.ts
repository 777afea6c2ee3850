import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { roles } from '$lib/roles';

export const passwordField = z
	.string()
	.min(10, 'Use at least 10 characters.')
	.max(200, 'Use at most 200 characters.');

export const staffMember = z.object({
	id: z.uuid(),
	name: text('The name')
		.trim()
		.min(2, 'Enter the full name (at least 2 characters).')
		.max(80, 'Use at most 80 characters.'),
	email: z.email('Enter a valid e-mail address.').max(200),
	role: z.enum(roles, { error: 'Choose technician, senior or lead.' }),
	password: passwordField
});

export const createStaff = staffMember.omit({ id: true });
export const changeRole = staffMember.pick({ id: true, role: true });
export const setDisabled = staffMember.pick({ id: true }).extend({ disabled: z.boolean() });
export const resetPassword = staffMember.pick({ id: true, password: true });

export const changeOwnPassword = z
	.object({
		current: z.string().min(1, 'Enter your current password.'),
		password: passwordField,
		confirm: z.string()
	})
	.refine((v) => v.password === v.confirm, { path: ['confirm'], message: 'The two new passwords differ.' });

export const signInForm = z.object({
	email: z.email('Enter the e-mail address you sign in with.'),
	password: z.string().min(1, 'Enter your password.').max(200)
});
