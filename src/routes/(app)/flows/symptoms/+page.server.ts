import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import { hasRole } from '$lib/roles';
import { requireRole, requireUser } from '$lib/server/guards';
import { refusalOf, RuleError } from '$lib/server/http';
import * as catalogue from '$lib/server/symptoms/queries';
import * as staff from '$lib/server/staff/queries';
import { symptomAdd, symptomEdit } from '$lib/schemas/symptom';
import { groupSymptoms } from '$lib/symptoms';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const canEdit = hasRole(user.role, 'senior');
	const [usage, audit] = await Promise.all([
		catalogue.usage(),
		canEdit ? staff.auditFor('symptom', undefined, 20) : []
	]);
	return {
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

/** Field messages keyed by field name, the first per field. */
function fieldErrors(error: z.ZodError): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = String(issue.path[0] ?? 'form');
		out[key] ??= issue.message;
	}
	return out;
}

type Refusal = {
	form: 'add' | 'update';
	code?: string | null;
	values: Record<string, string>;
	errors: Record<string, string>;
};
const refuse = (status: number, data: Refusal) => fail(status, data);

async function fields(event: { request: Request }) {
	return Object.fromEntries([...(await event.request.formData())].map(([k, v]) => [k, String(v)]));
}

export const actions: Actions = {
	add: async (event) => {
		const user = requireRole(event, 'senior');
		const values = await fields(event);
		const parsed = symptomAdd.safeParse(values);
		if (!parsed.success) return refuse(400, { form: 'add', values, errors: fieldErrors(parsed.error) });
		try {
			const row = await catalogue.add(user.id, parsed.data);
			return {
				form: 'add',
				saved: row.code,
				message: `“${row.label}” is in the catalogue under ${row.group}.`
			};
		} catch (e) {
			const { status, body } = refusalOf(e);
			const field = e instanceof RuleError ? e.field : undefined;
			return refuse(status, { form: 'add', values, errors: { [field ?? 'form']: body.message } });
		}
	},
	update: async (event) => {
		const user = requireRole(event, 'senior');
		const values = await fields(event);
		const code = z.string().max(60).safeParse(values.code);
		const parsed = symptomEdit.safeParse(values);
		if (!code.success || !parsed.success)
			return refuse(400, {
				form: 'update',
				code: values.code ?? null,
				values,
				errors: parsed.success ? { form: 'Choose a symptom to change.' } : fieldErrors(parsed.error)
			});
		try {
			const row = await catalogue.update(user.id, code.data, parsed.data);
			const message = row.retired
				? `“${row.label}” is retired: intake no longer offers it; jobs that have it keep it.`
				: `“${row.label}” is saved.`;
			return { form: 'update', saved: row.code, message };
		} catch (e) {
			const { status, body } = refusalOf(e);
			return refuse(status, { form: 'update', code: code.data, values, errors: { form: body.message } });
		}
	}
};
