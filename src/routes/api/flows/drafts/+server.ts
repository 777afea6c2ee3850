import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { storableJson } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import { authoringFailure, draftJson, readJson, type DraftJson } from '$lib/server/flows/http';
import type { RequestHandler } from './$types';

export type DraftCreatedResponse = DraftJson;

const body = z.union([
	z.strictObject({ fromVersionId: z.uuid() }),
	z.strictObject({ definition: storableJson(z.record(z.string(), z.unknown()), 'The flow') })
]);

/** POST /api/flows/drafts — { fromVersionId } for a draft of a published version, or { definition } for a new flow. */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'senior');
	const parsed = body.safeParse(await readJson(event.request));
	if (!parsed.success)
		return json(
			{
				message: 'Send { fromVersionId } or { definition }.',
				issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }))
			},
			{ status: 400 }
		);
	try {
		const draft = await authoring.createDraft(user, parsed.data);
		return json(draftJson(draft) satisfies DraftCreatedResponse, {
			status: 201,
			headers: { location: `/api/flows/drafts/${draft.id}` }
		});
	} catch (e) {
		return authoringFailure(e);
	}
};
