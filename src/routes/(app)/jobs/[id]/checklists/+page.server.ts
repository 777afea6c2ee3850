import { error, fail } from '@sveltejs/kit';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import * as checklists from '$lib/server/checklists/queries';
import { actionFailure } from '$lib/server/http';
import type { FunctionTestDef } from '$lib/domain/functionTests';
import { statusLabels } from '$lib/domain/jobStatus';
import { renderMarkdown } from '$lib/markdown/render';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const view = await checklists.forJob(event.params.id);
	if (!view)
		error(404, {
			message: 'No checklists for this job: they open once a run of the job reaches its verdict.'
		});
	// Rendered and sanitised here, so the page ships neither marked nor DOMPurify (as the run screen).
	return { view, statusLabels, risksHtml: renderMarkdown(view.verdict.risks) };
};

const repairForm = z.object({ done: z.array(z.string().regex(/^r\d{1,3}$/)).max(200) });
/** The form for the items this job's device is asked about. */
const functionForm = (defs: readonly FunctionTestDef[]) =>
	z.object(
		Object.fromEntries(
			defs.map((t) => [
				t.key,
				z.object({
					result: z.enum(['pass', 'fail', 'not-tested']).nullable(),
					note: text(`The note on ${t.label}`)
						.trim()
						.max(500, `Keep the note on ${t.label} under 500 characters.`)
				})
			])
		)
	);
const confirmForm = z.object({
	confirmed: z.enum(['yes', 'no'], { error: 'Choose yes or no.' }),
	note: text('The note').trim().max(2000, 'Keep the note under 2000 characters.')
});

/** Each action answers `{ action, ok, message, field? }`; the page shows it beside its form. */
function refused(action: string, status: number, message: string, field?: string) {
	return fail(status, { action, ok: false, message, field });
}

/** A refusal with its status and message beside its form. */
const ruled = (action: string, e: unknown) => actionFailure(e, { action, ok: false });

const movedTo = (to: string | null) =>
	to ? ` The job is now “${statusLabels[to as keyof typeof statusLabels]}”.` : '';

export const actions: Actions = {
	repair: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await event.request.formData();
		const parsed = repairForm.safeParse({ done: form.getAll('done') });
		if (!parsed.success) return refused('repair', 400, 'The repair checklist has changed; reload the page.');
		try {
			const r = await checklists.saveRepair(event.params.id, parsed.data.done, user.id);
			return { action: 'repair', ok: true, message: `Repair checklist saved.${movedTo(r.moved)}` };
		} catch (e) {
			return ruled('repair', e);
		}
	},
	functionTest: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await event.request.formData();
		const view = await checklists.forJob(event.params.id);
		if (!view) return refused('functionTest', 404, 'This job has no run with a verdict yet.');
		const defs = view.functionTest;
		const raw = Object.fromEntries(
			defs.map((t) => [
				t.key,
				{ result: form.get(`result-${t.key}`) || null, note: String(form.get(`note-${t.key}`) ?? '') }
			])
		);
		const parsed = functionForm(defs).safeParse(raw);
		if (!parsed.success)
			return refused('functionTest', 400, parsed.error.issues.map((i) => i.message).join(' '));
		try {
			const r = await checklists.saveFunctionTest(
				event.params.id,
				parsed.data as checklists.FunctionTestInput,
				user.id
			);
			return {
				action: 'functionTest',
				ok: !r.untested?.length,
				message: `Function test saved.${movedTo(r.moved)}${r.message ? ` ${r.message}` : ''}`,
				untested: r.untested ?? []
			};
		} catch (e) {
			return ruled('functionTest', e);
		}
	},
	confirm: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await event.request.formData();
		const parsed = confirmForm.safeParse({
			confirmed: form.get('confirmed') ?? undefined,
			note: String(form.get('note') ?? '')
		});
		if (!parsed.success) {
			const issue = parsed.error.issues[0];
			return refused('confirm', 400, issue.message, String(issue.path[0] ?? ''));
		}
		try {
			await checklists.confirmVerdict(
				event.params.id,
				{ confirmed: parsed.data.confirmed === 'yes', note: parsed.data.note },
				user.id
			);
			return { action: 'confirm', ok: true, message: 'Your word on the verdict is recorded.' };
		} catch (e) {
			return ruled('confirm', e);
		}
	}
};
