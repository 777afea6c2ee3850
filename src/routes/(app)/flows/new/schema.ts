import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { kebabId, RESERVED_FLOW_IDS } from '$lib/flows/schema';
import { MAX_FLOW_CHARS } from '$lib/flows/parse';

/** Largest upload: the largest flow text, in bytes (a character may take up to 4 bytes in UTF-8). */
export const MAX_UPLOAD_BYTES = MAX_FLOW_CHARS * 4;

export const blankForm = z.object({
	id: kebabId.refine(
		(id) => !RESERVED_FLOW_IDS.includes(id),
		'That id is taken by the library itself; choose another.'
	),
	title: text('The title')
		.trim()
		.min(3, 'Give the flow a title of at least 3 characters.')
		.max(200, 'Keep the title under 200 characters.')
});

/**
 * The import form's pasted text (superform id `import`). The file beside it is read from the
 * posted FormData by the action itself: it is checked for size before it is read.
 */
export const importForm = z.object({ text: z.string() });
