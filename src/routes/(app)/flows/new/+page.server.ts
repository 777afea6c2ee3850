import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate, type SuperValidated } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { formatPath } from '$lib/flows/check';
import { MAX_FLOW_CHARS } from '$lib/flows/parse';
import { requireRole } from '$lib/server/guards';
import { refusalOf } from '$lib/server/http';
import * as authoring from '$lib/server/flows/authoring';
import type { Actions, PageServerLoad } from './$types';
import { blankForm, importForm, MAX_UPLOAD_BYTES } from './schema';
import { newFlow } from '$lib/flows/edit';
import { storable, unstorableMessage } from '$lib/schemas/text';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'senior');
	return { maxChars: MAX_FLOW_CHARS };
};

type ImportForm = SuperValidated<{ text: string }>;
type Problem = { where: string | null; line: number | null; message: string };
const problemsOf = (e: unknown): Problem[] =>
	authoring.problemsOf(e).map((p) => ({
		where: p.step ?? (p.path?.length ? formatPath(p.path) : null),
		line: p.line ?? null,
		message: p.message
	}));

const blankAdapter = zod4(blankForm);
const importAdapter = zod4(importForm);

export const actions: Actions = {
	blank: async (event) => {
		const user = requireRole(event, 'senior');
		const form = await superValidate(event.request, blankAdapter, { id: 'blank' });
		if (!form.valid) return fail(400, { form });
		let draftId: string;
		try {
			draftId = (await authoring.createDraft(user, { definition: newFlow(form.data.id, form.data.title) }))
				.id;
		} catch (e) {
			// Every refusal here is about the id (taken, reserved), so it shows beside the id.
			const { status, body } = refusalOf(e);
			return setError(form, 'id', body.message, { status: status as 400 });
		}
		redirect(303, `/flows/${form.data.id}/drafts/${draftId}`);
	},

	import: async (event) => {
		const user = requireRole(event, 'senior');
		const declared = Number(event.request.headers.get('content-length') ?? 0);
		const tooBig = `A flow file may be at most ${Math.round(MAX_UPLOAD_BYTES / 1024)} KB; this one is larger. Nothing was imported.`;
		/** A refusal: the sentence as the form's own error, the text (if any) kept in the box. */
		const refuse = (form: ImportForm, status: number, message: string, problems: Problem[] = []) => {
			setError(form, '', message);
			return fail(status, { form, problems });
		};
		if (declared > MAX_UPLOAD_BYTES + 64 * 1024)
			return refuse(await superValidate(importAdapter, { id: 'import' }), 413, tooBig);
		let data: FormData;
		try {
			data = await event.request.formData();
		} catch {
			const empty = await superValidate(importAdapter, { id: 'import' });
			return refuse(empty, 400, 'The upload was not understood; choose the file again.');
		}
		// The file stays a FormData read (its size is checked before it is read); the pasted text is a superform field.
		const form = await superValidate(data, importAdapter, { id: 'import' });
		const file = data.get('file');
		let text = form.data.text;
		if (file instanceof File && file.size > 0) {
			if (file.size > MAX_UPLOAD_BYTES) return refuse(form, 413, tooBig);
			text = await file.text();
		}
		// Forms send line breaks as CRLF; the flow (and the text given back) keeps plain newlines.
		text = text.replace(/\r\n?/g, '\n');
		form.data.text = '';
		if (!storable(text)) return refuse(form, 400, unstorableMessage('The flow file'));
		if (!text.trim()) return refuse(form, 400, 'Choose a .flow.yaml file, or paste its text.');
		try {
			const { draft, problems } = await authoring.importDraft(user, text);
			redirect(303, `/flows/${draft.flowId}/drafts/${draft.id}?imported=${problems.length}`);
		} catch (e) {
			// The text comes back in the box below, so nothing is lost: fix it there and import again.
			const { status, body } = refusalOf(e);
			form.data.text = text.length <= MAX_FLOW_CHARS ? text : '';
			return refuse(form, status, body.message, problemsOf(e));
		}
	}
};
