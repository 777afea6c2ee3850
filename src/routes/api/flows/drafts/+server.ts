import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { storableJson } from '$lib/schemas/text';
import { requireRole } from '$lib/server/guards';
import * as authoring from '$lib/server/flows/authoring';
import { draftJson, type DraftJson } from '$lib/server/flows/draft-json';
import { answer, badRequest, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export type DraftCreatedResponse = DraftJson;

const body = z.union([
	z.strictObject({ fromVersionId: z.uuid() }),
	z.strictObject({ definition: storableJson(z.record(z.string(), z.unknown()), 'The flow') })
]);

/** POST /api/flows/drafts — { fromVersionId } for a draft of a published version, or { definition } for a new flow. */
export const POST: RequestHandler = async (event) => {
	const user = requireRole(event, 'senior');
	const read = await readJson(event.request);
	if (!read.ok) return read.response;
	const parsed = body.safeParse(read.body);
	if (!parsed.success) return badRequest(parsed.error, 'Send { fromVersionId } or { definition }.');
	return answer(async () => {
		const draft = await authoring.createDraft(user, parsed.data);
		return json(draftJson(draft) satisfies DraftCreatedResponse, {
			status: 201,
			headers: { location: `/api/flows/drafts/${draft.id}` }
		});
	});
};
