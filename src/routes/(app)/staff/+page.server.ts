import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { requireRole } from '$lib/server/guards';
import { formFailure, refusalOf } from '$lib/server/http';
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

/** Row actions answer with the row's id, so the page shows the message on that row. */
function rowFailure(id: string, status: number, text: string) {
	return fail(status, { row: { id, message: text, ok: false } });
}
const rowRefusal = (id: string, e: unknown) => {
	const { status, body } = refusalOf(e);
	return rowFailure(id, status, body.message);
};

async function parseRow<T extends z.ZodType>(request: Request, schema: T) {
	const raw = Object.fromEntries(await request.formData());
	const id = typeof raw.id === 'string' ? raw.id : '';
	const disabled = raw.disabled === undefined ? undefined : raw.disabled === 'true';
	const parsed = schema.safeParse({ ...raw, disabled });
	const problem = parsed.success ? '' : (parsed.error.issues[0]?.message ?? 'That request was malformed.');
	return { id, parsed, problem };
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
		const { id, parsed, problem } = await parseRow(event.request, schemas.changeRole);
		if (!parsed.success) return rowFailure(id, 400, problem);
		try {
			const updated = await staff.changeRole(lead.id, parsed.data.id, parsed.data.role);
			return { row: { id: updated.id, message: `Role changed to ${updated.role}.`, ok: true } };
		} catch (e) {
			return rowRefusal(parsed.data.id, e);
		}
	},

	disabled: async (event) => {
		const lead = requireRole(event, 'lead');
		const { id, parsed, problem } = await parseRow(event.request, schemas.setDisabled);
		if (!parsed.success) return rowFailure(id, 400, problem);
		try {
			const updated = await staff.setDisabled(lead.id, parsed.data.id, parsed.data.disabled);
			return {
				row: {
					id: updated.id,
					message: updated.disabled ? 'Disabled: they can no longer sign in.' : 'Enabled again.',
					ok: true
				}
			};
		} catch (e) {
			return rowRefusal(parsed.data.id, e);
		}
	},

	reset: async (event) => {
		const lead = requireRole(event, 'lead');
		const { id, parsed, problem } = await parseRow(event.request, schemas.resetPassword);
		if (!parsed.success) return rowFailure(id, 400, `Temporary password: ${problem}`);
		try {
			await staff.resetPassword(lead.id, parsed.data.id, parsed.data.password);
			return {
				row: {
					id: parsed.data.id,
					message: 'Password reset. They choose a new one at their next sign-in.',
					ok: true
				}
			};
		} catch (e) {
			return rowRefusal(parsed.data.id, e);
		}
	}
};
