import { z } from 'zod';
import { storableJson, text } from '$lib/schemas/text';
import { MAX_FLOW_CHARS } from '$lib/flows/parse';
import { kebabId } from '$lib/flows/schema';

export const draftParams = z.object({
	id: kebabId,
	draftId: z.uuid({ error: 'No such draft.' })
});

/** An autosave: the revision the editor started from and the whole definition (shape-checked later). */
export const saveBody = z.object({
	revision: z.number().int().min(1),
	definition: storableJson(z.record(z.string(), z.unknown()), 'The flow')
});

/** Bytes an autosave may send: the largest flow file allowed, with room for JSON's quoting. */
export const MAX_SAVE_BYTES = MAX_FLOW_CHARS * 2;

/** The reviewer's "Send back to the author" superform (id `send-back`): the note the author reads. */
export const sendBackForm = z.object({
	comment: text('The comment')
		.trim()
		.min(1, 'Say what needs changing, so the author knows.')
		.max(4000, 'Keep the comment under 4000 characters.')
});
