import { error, fail } from '@sveltejs/kit';
import { message, setError, superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/guards';
import { act } from '$lib/server/http';
import * as checklists from '$lib/server/checklists/queries';
import { statusLabels } from '$lib/domain/jobStatus';
import { renderMarkdown } from '$lib/markdown/render';
import {
	confirmForm,
	functionTestForm,
	noteField,
	repairForm,
	resultField,
	type ChecklistMessage
} from '$lib/schemas/checklist';
import type { Actions, PageServerLoad } from './$types';

type Items = checklists.ChecklistView['functionTest'];
const repairAdapter = zod4(repairForm);
const confirmAdapter = zod4(confirmForm);
const functionAdapter = (items: Items) => zod4(functionTestForm(items));
type FunctionFields = Infer<ReturnType<typeof functionTestForm>>;

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'technician');
	const view = await checklists.forJob(event.params.id);
	if (!view)
		error(404, {
			message: 'No checklists for this job: they open once a run of the job reaches its verdict.'
		});
	const saved = Object.fromEntries(
		view.functionTest.flatMap((i) => [
			[resultField(i.key), i.result],
			[noteField(i.key), i.note]
		])
	);
	const done = view.repair.filter((i) => i.result === 'done').map((i) => i.key);
	const [repair, functionTest, confirm] = await Promise.all([
		superValidate({ done }, repairAdapter, { id: 'repair', errors: false }),
		superValidate(saved, functionAdapter(view.functionTest), { id: 'functionTest', errors: false }),
		superValidate(confirmAdapter, { id: 'confirm' })
	]);
	// Rendered and sanitised here, so the page ships neither marked nor DOMPurify (as the run screen).
	return {
		view,
		statusLabels,
		risksHtml: renderMarkdown(view.verdict.risks),
		forms: { repair, functionTest, confirm }
	};
};

const movedTo = (to: string | null) =>
	to ? ` The job is now “${statusLabels[to as keyof typeof statusLabels]}”.` : '';
const said = (ok: boolean, text: string, held?: string[]): ChecklistMessage => ({ ok, text, held });

export const actions: Actions = {
	repair: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await superValidate(event.request, repairAdapter, { id: 'repair' });
		if (!form.valid) return setError(form, '', 'The repair checklist has changed; reload the page.');
		return act(form, async () => {
			const r = await checklists.saveRepair(event.params.id, form.data.done, user.id);
			return message(form, said(true, `Repair checklist saved.${movedTo(r.moved)}`));
		});
	},
	functionTest: async (event) => {
		const user = requireRole(event, 'technician');
		const view = await checklists.forJob(event.params.id);
		const items = view?.functionTest ?? [];
		const form = await superValidate(event.request, functionAdapter(items), { id: 'functionTest' });
		if (!view) return setError(form, '', 'This job has no run with a verdict yet.', { status: 404 });
		if (!form.valid) return setError(form, '', 'Some notes need a look; see the marked items.');
		const data = form.data as FunctionFields;
		const input: checklists.FunctionTestInput = Object.fromEntries(
			items.map((i) => [
				i.key,
				{
					result: data[resultField(i.key)] as checklists.FunctionResult | null,
					note: data[noteField(i.key)] as string
				}
			])
		);
		return act(form, async () => {
			const r = await checklists.saveFunctionTest(event.params.id, input, user.id);
			const text = `Function test saved.${movedTo(r.moved)}${r.message ? ` ${r.message}` : ''}`;
			return message(form, said(!r.untested?.length, text, r.untested));
		});
	},
	confirm: async (event) => {
		const user = requireRole(event, 'technician');
		const form = await superValidate(event.request, confirmAdapter, { id: 'confirm' });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			const answer = { confirmed: form.data.confirmed === 'yes', note: form.data.note };
			await checklists.confirmVerdict(event.params.id, answer, user.id);
			return message(form, said(true, 'Your word on the verdict is recorded.'));
		});
	}
};
