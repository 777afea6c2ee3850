import { fail, redirect } from '@sveltejs/kit';
import { formatPath } from '$lib/flows/check';
import { MAX_FLOW_CHARS } from '$lib/flows/parse';
import { requireRole } from '$lib/server/guards';
import { refusalOf } from '$lib/server/http';
import * as authoring from '$lib/server/flows/authoring';
import type { Actions, PageServerLoad } from './$types';
import { blankForm, MAX_UPLOAD_BYTES } from './schema';
import { newFlow } from '$lib/flows/edit';
import { storable, unstorableMessage } from '$lib/schemas/text';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'senior');
	return { maxChars: MAX_FLOW_CHARS };
};

type Problem = { where: string | null; line: number | null; message: string };
const problemsOf = (e: unknown): Problem[] =>
	authoring.problemsOf(e).map((p) => ({
		where: p.step ?? (p.path?.length ? formatPath(p.path) : null),
		line: p.line ?? null,
		message: p.message
	}));

export const actions: Actions = {
	blank: async (event) => {
		const user = requireRole(event, 'senior');
		const raw = Object.fromEntries(await event.request.formData());
		const form = blankForm.safeParse(raw);
		const values = { id: String(raw.id ?? ''), title: String(raw.title ?? '') };
		if (!form.success) {
			const errors: Record<string, string> = Object.fromEntries(
				form.error.issues.map((i) => [String(i.path[0]), i.message])
			);
			return fail(400, { blank: { ...values, errors } });
		}
		let draftId: string;
		try {
			draftId = (await authoring.createDraft(user, { definition: newFlow(form.data.id, form.data.title) }))
				.id;
		} catch (e) {
			const { status, body } = refusalOf(e);
			return fail(status, { blank: { ...values, errors: { id: body.message } as Record<string, string> } });
		}
		redirect(303, `/flows/${form.data.id}/drafts/${draftId}`);
	},

	import: async (event) => {
		const user = requireRole(event, 'senior');
		const declared = Number(event.request.headers.get('content-length') ?? 0);
		const tooBig = `A flow file may be at most ${Math.round(MAX_UPLOAD_BYTES / 1024)} KB; this one is larger. Nothing was imported.`;
		if (declared > MAX_UPLOAD_BYTES + 64 * 1024)
			return fail(413, { upload: { message: tooBig, text: '', problems: [] } });
		let data: FormData;
		try {
			data = await event.request.formData();
		} catch {
			return fail(400, {
				upload: { message: 'The upload was not understood; choose the file again.', text: '', problems: [] }
			});
		}
		const file = data.get('file');
		const pasted = data.get('text');
		let text = '';
		if (file instanceof File && file.size > 0) {
			if (file.size > MAX_UPLOAD_BYTES)
				return fail(413, { upload: { message: tooBig, text: '', problems: [] } });
			text = await file.text();
		} else if (typeof pasted === 'string') text = pasted;
		// Forms send line breaks as CRLF; the flow (and the text given back) keeps plain newlines.
		text = text.replace(/\r\n?/g, '\n');
		if (!storable(text))
			return fail(400, { upload: { message: unstorableMessage('The flow file'), text: '', problems: [] } });
		if (!text.trim())
			return fail(400, {
				upload: { message: 'Choose a .flow.yaml file, or paste its text.', text: '', problems: [] }
			});
		try {
			const { draft, problems } = await authoring.importDraft(user, text);
			redirect(303, `/flows/${draft.flowId}/drafts/${draft.id}?imported=${problems.length}`);
		} catch (e) {
			// The text comes back in the box below, so nothing is lost: fix it there and import again.
			const { status, body } = refusalOf(e);
			return fail(status, {
				upload: {
					message: body.message,
					text: text.length <= MAX_FLOW_CHARS ? text : '',
					problems: problemsOf(e)
				}
			});
		}
	}
};
