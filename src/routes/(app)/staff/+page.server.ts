import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/guards';
import { act, formFailure } from '$lib/server/http';
import * as staff from '$lib/server/staff/queries';
import * as schemas from '$lib/schemas/staff';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'lead');
	const [members, audit, createForm] = await Promise.all([
		staff.list(),
		staff.auditFor('user', undefined, 30),
		superValidate(zod4(schemas.createStaff), { id: 'create' })
	]);
	return { members, audit, createForm };
};

// Each row's three forms are superforms of their own, told apart by the member's id.
const roleAdapter = zod4(schemas.changeRole);
const disabledAdapter = zod4(schemas.setDisabled);
const resetAdapter = zod4(schemas.resetPassword);

/** The posted fields and the row form's id, `<action>-<member id>`. */
async function rowPost(request: Request, kind: 'role' | 'disabled' | 'reset') {
	const body = await request.formData();
	return { body, id: `${kind}-${String(body.get('id') ?? '')}` };
}

export const actions: Actions = {
	create: async (event) => {
		const lead = requireRole(event, 'lead');
		const form = await superValidate(event.request, zod4(schemas.createStaff), { id: 'create' });
		if (!form.valid) {
			form.data.password = '';
			return fail(400, { createForm: form });
		}
		try {
			const created = await staff.create(lead.id, form.data);
			form.data.password = '';
			return message(
				form,
				`${created.name} was added. Give them the temporary password; they choose their own at first sign-in.`
			);
		} catch (e) {
			form.data.password = '';
			return formFailure(form, e);
		}
	},

	role: async (event) => {
		const lead = requireRole(event, 'lead');
		const { body, id } = await rowPost(event.request, 'role');
		const form = await superValidate(body, roleAdapter, { id });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const updated = await staff.changeRole(lead.id, form.data.id, form.data.role);
			return message(form, `Role changed to ${updated.role}.`);
		});
	},

	disabled: async (event) => {
		const lead = requireRole(event, 'lead');
		const { body, id } = await rowPost(event.request, 'disabled');
		const form = await superValidate(body, disabledAdapter, { id });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const updated = await staff.setDisabled(lead.id, form.data.id, form.data.disabled);
			return message(form, updated.disabled ? 'Disabled: they can no longer sign in.' : 'Enabled again.');
		});
	},

	reset: async (event) => {
		const lead = requireRole(event, 'lead');
		const { body, id } = await rowPost(event.request, 'reset');
		const form = await superValidate(body, resetAdapter, { id });
		// The temporary password is not sent back, as with the create form.
		const password = form.data.password;
		form.data.password = '';
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			await staff.resetPassword(lead.id, form.data.id, password);
			return message(form, 'Password reset. They choose a new one at their next sign-in.');
		});
	}
};
