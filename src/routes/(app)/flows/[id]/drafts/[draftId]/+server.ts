import { json } from '@sveltejs/kit';
import type { FlowDefinition } from '$lib/flows/schema';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import type { RequestHandler } from './$types';
import { refusalOf } from '$lib/server/http';
import { draftParams, MAX_SAVE_BYTES, saveBody } from './schema';

/** The editor's autosave answers. */
export type SaveResponse =
	| { revision: number }
	| { message: string; current?: { revision: number; definition: FlowDefinition; by: string | null } }
	| { message: string; issues?: { path?: (string | number)[]; message: string }[] };

/** PUT: autosave of a draft with optimistic locking (409 with the draft as it is now). */
export const PUT: RequestHandler = async (event) => {
	const user = requireRole(event, 'senior');
	const params = draftParams.safeParse(event.params);
	if (!params.success) return json({ message: 'No such draft.' } satisfies SaveResponse, { status: 404 });
	const size = Number(event.request.headers.get('content-length') ?? 0);
	if (size > MAX_SAVE_BYTES)
		return json({ message: `The draft is too large to save (${size} bytes).` } satisfies SaveResponse, {
			status: 413
		});
	let raw: unknown;
	try {
		raw = await event.request.json();
	} catch {
		return json({ message: 'The draft must be sent as JSON.' } satisfies SaveResponse, { status: 400 });
	}
	const body = saveBody.safeParse(raw);
	if (!body.success)
		return json(
			{
				message: 'The save was not understood.',
				issues: body.error.issues.map((i) => ({ path: i.path as (string | number)[], message: i.message }))
			} satisfies SaveResponse,
			{ status: 400 }
		);
	try {
		const saved = await authoring.saveDraft({ id: user.id, role: user.role }, params.data.draftId, body.data);
		return json({ revision: saved.revision } satisfies SaveResponse);
	} catch (e) {
		// The editor reads its own shape: the conflicting draft's revision and definition, and the
		// flow's problems as issues.
		const { status, body: refusal } = refusalOf(e);
		const now = authoring.currentOf(e);
		const problems = authoring.problemsOf(e);
		return json(
			{
				message: refusal.message,
				...(now && { current: { revision: now.revision, definition: now.definition, by: null } }),
				...(problems.length && { issues: problems.map((p) => ({ path: p.path, message: p.message })) })
			} satisfies SaveResponse,
			{ status }
		);
	}
};
