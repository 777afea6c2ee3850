import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { storableJson, text } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import * as flowLibrary from '$lib/server/flows/queries';
import { authoringFailure, draftJson, readJson, type DraftJson } from '$lib/server/flows/http';
import type { RequestHandler } from './$types';

export type DraftResponse = DraftJson;

const id = z.uuid();
const saveBody = z.strictObject({
	revision: z.number().int().min(1),
	definition: storableJson(z.record(z.string(), z.unknown()), 'The flow'),
	changelog: text('The changelog').max(2000).nullable().optional()
});

/** GET /api/flows/drafts/<id> — a draft (or any version) with its revision, for the editor. */
export const GET: RequestHandler = async (event) => {
	requireRole(event, 'senior');
	const draftId = id.safeParse(event.params.draftId);
	const draft = draftId.success ? await flowLibrary.getVersionById(draftId.data) : undefined;
	if (!draft) return json({ message: 'No such draft.' }, { status: 404 });
	return json(draftJson(draft) satisfies DraftResponse);
};

/** PUT /api/flows/drafts/<id> — { revision, definition, changelog? }; 409 with the current draft when someone saved in between. */
export const PUT: RequestHandler = async (event) => {
	const user = requireRole(event, 'senior');
	const draftId = id.safeParse(event.params.draftId);
	if (!draftId.success) return json({ message: 'No such draft.' }, { status: 404 });
	const parsed = saveBody.safeParse(await readJson(event.request));
	if (!parsed.success)
		return json(
			{
				message: 'Send { revision, definition }.',
				issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }))
			},
			{ status: 400 }
		);
	try {
		return json(
			draftJson(await authoring.saveDraft(user, draftId.data, parsed.data)) satisfies DraftResponse
		);
	} catch (e) {
		return authoringFailure(e);
	}
};
