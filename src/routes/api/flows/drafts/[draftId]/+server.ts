import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { storableJson, text } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import * as flowLibrary from '$lib/server/flows/queries';
import { draftJson, type DraftJson } from '$lib/server/flows/draft-json';
import { answer, badRequest, readJson, type ApiError } from '$lib/server/http';
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
	if (!draft)
		return json({ message: 'No such draft.', code: 'not-found' } satisfies ApiError, { status: 404 });
	return json(draftJson(draft) satisfies DraftResponse);
};

/** PUT /api/flows/drafts/<id> — { revision, definition, changelog? }; 409 with the current draft when someone saved in between. */
export const PUT: RequestHandler = async (event) => {
	const user = requireRole(event, 'senior');
	const draftId = id.safeParse(event.params.draftId);
	if (!draftId.success)
		return json({ message: 'No such draft.', code: 'not-found' } satisfies ApiError, { status: 404 });
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = saveBody.safeParse(read.body);
	if (!parsed.success) return badRequest(parsed.error, 'Send { revision, definition }.');
	return answer(async () =>
		json(draftJson(await authoring.saveDraft(user, draftId.data, parsed.data)) satisfies DraftResponse)
	);
};
