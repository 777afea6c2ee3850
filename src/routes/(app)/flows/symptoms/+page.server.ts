import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { hasRole } from '$lib/roles';
import { requireRole, requireUser } from '$lib/server/guards';
import { act } from '$lib/server/http';
import * as catalogue from '$lib/server/symptoms/queries';
import * as staff from '$lib/server/staff/queries';
import { symptomAdd, symptomEdit } from '$lib/schemas/symptom';
import { groupSymptoms } from '$lib/symptoms';
import type { Actions, PageServerLoad } from './$types';

const addAdapter = zod4(symptomAdd);
const editAdapter = zod4(symptomEdit);

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const canEdit = hasRole(user.role, 'senior');
	const [usage, audit] = await Promise.all([
		catalogue.usage(),
		canEdit ? staff.auditFor('symptom', undefined, 20) : []
	]);
	const editForms = canEdit
		? Object.fromEntries(
				await Promise.all(
					usage.map(
						async (s) =>
							[
								s.code,
								await superValidate(
									{ code: s.code, label: s.label, group: s.group, retired: s.retired },
									editAdapter,
									{ id: editId(s.code), errors: false }
								)
							] as const
					)
				)
			)
		: {};
	return {
		addForm: await superValidate(addAdapter, { id: 'symptom-add' }),
		editForms,
		groups: groupSymptoms(usage),
		groupNames: [...new Set(usage.map((s) => s.group))],
		canEdit,
		audit: audit.map((a) => ({
			id: a.id,
			at: a.at,
			text: describe(a.action, a.targetId, a.details),
			byName: a.actorName ?? null
		}))
	};
};

/** An audit entry in words, for the "Recent changes" list. */
function describe(action: string, code: string | null, details: Record<string, unknown>): string {
	const to = (details.to ?? {}) as Record<string, unknown>;
	const from = (details.from ?? {}) as Record<string, unknown>;
	switch (action) {
		case 'symptom.add':
			return `added ${code} (“${details.label}”, ${details.group})`;
		case 'symptom.retire':
			return `retired ${code}`;
		case 'symptom.restore':
			return `offered ${code} again`;
		case 'symptom.seed':
			return `seeded ${Array.isArray(details.codes) ? details.codes.length : 0} symptoms`;
		default: {
			const parts = [];
			if ('label' in to) parts.push(`renamed “${from.label}” to “${to.label}”`);
			if ('group' in to) parts.push(`moved from ${from.group} to ${to.group}`);
			return `${code}: ${parts.join(', ') || 'changed'}`;
		}
	}
}

/** The row forms' ids: one superform per symptom, told apart by its code. */
const editId = (code: string) => `symptom-${code}`;

export const actions: Actions = {
	add: async (event) => {
		const user = requireRole(event, 'senior');
		const form = await superValidate(event.request, addAdapter, { id: 'symptom-add' });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const row = await catalogue.add(user.id, form.data);
			return message(form, `“${row.label}” is in the catalogue under ${row.group}.`);
		});
	},
	update: async (event) => {
		const user = requireRole(event, 'senior');
		const body = await event.request.formData();
		const form = await superValidate(body, editAdapter, { id: editId(String(body.get('code') ?? '')) });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const row = await catalogue.update(user.id, form.data.code, form.data);
			return message(
				form,
				row.retired
					? `“${row.label}” is retired: intake no longer offers it; jobs that have it keep it.`
					: `“${row.label}” is saved.`
			);
		});
	}
};
