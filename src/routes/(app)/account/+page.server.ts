import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireUser } from '$lib/server/guards';
import { renewSession } from '$lib/server/auth';
import { verifyPassword } from '$lib/server/passwords';
import * as staff from '$lib/server/staff/queries';
import { changeOwnPassword } from '$lib/schemas/staff';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const [member, form] = await Promise.all([staff.findById(user.id), superValidate(zod4(changeOwnPassword))]);
	return { mustChange: member?.mustChangePassword ?? false, form };
};

export const actions: Actions = {
	password: async (event) => {
		const user = requireUser(event);
		const form = await superValidate(event.request, zod4(changeOwnPassword));
		const blank = () => Object.assign(form.data, { current: '', password: '', confirm: '' });
		if (!form.valid) return fail(400, { form: blank() && form });
		const full = await staff.findByEmail(user.email);
		if (!full || !(await verifyPassword(full.passwordHash, form.data.current))) {
			blank();
			return setError(form, 'current', 'That is not your current password.');
		}
		if (form.data.current === form.data.password) {
			blank();
			return setError(form, 'password', 'Choose a password different from the current one.');
		}
		await staff.changeOwnPassword(user.id, form.data.password);
		await renewSession(event, user.email, form.data.password);
		blank();
		return message(form, 'Your password is changed.');
	}
};
