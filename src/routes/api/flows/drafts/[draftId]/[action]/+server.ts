import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import { draftJson, type DraftJson } from '$lib/server/flows/draft-json';
import { answer, badRequest, readJson, type ApiError } from '$lib/server/http';
import type { RequestHandler } from './$types';

export type DraftActionResponse = DraftJson;

const params = z.object({ draftId: z.uuid(), action: z.enum(['submit', 'approve', 'send-back']) });
const sendBackBody = z.object({
	comment: text('The comment').trim().min(1, 'Say what needs changing.').max(4000)
});

/** POST /api/flows/drafts/<id>/submit | approve | send-back ({ comment }). */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'senior');
	const p = params.safeParse(event.params);
	if (!p.success)
		return json({ message: 'No such draft action.', code: 'not-found' } satisfies ApiError, { status: 404 });
	const { draftId, action } = p.data;
	return answer(async () => {
		if (action === 'submit')
			return json(draftJson(await authoring.submit(user, draftId)) satisfies DraftActionResponse);
		if (action === 'approve')
			return json(draftJson(await authoring.approve(user, draftId)) satisfies DraftActionResponse);
		const read = await readJson(event.request);
		if (!read.ok) return read.response;
		const body = sendBackBody.safeParse(read.body);
		if (!body.success) return badRequest(body.error, 'Say what needs changing.', { lead: 'first-issue' });
		return json(
			draftJson(await authoring.sendBack(user, draftId, body.data.comment)) satisfies DraftActionResponse
		);
	});
};
