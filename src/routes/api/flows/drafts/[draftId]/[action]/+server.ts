import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import { authoringFailure, draftJson, readJson, type DraftJson } from '$lib/server/flows/http';
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
	if (!p.success) return json({ message: 'No such draft action.' }, { status: 404 });
	try {
		const { draftId, action } = p.data;
		if (action === 'submit')
			return json(draftJson(await authoring.submit(user, draftId)) satisfies DraftActionResponse);
		if (action === 'approve')
			return json(draftJson(await authoring.approve(user, draftId)) satisfies DraftActionResponse);
		const body = sendBackBody.safeParse(await readJson(event.request));
		if (!body.success)
			return json(
				{
					message: body.error.issues[0].message,
					issues: body.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }))
				},
				{ status: 400 }
			);
		return json(
			draftJson(await authoring.sendBack(user, draftId, body.data.comment)) satisfies DraftActionResponse
		);
	} catch (e) {
		return authoringFailure(e);
	}
};
