import { z } from 'zod';
import { text } from '$lib/schemas/text';

/** Approve or decline (one superform, id `decision`, two buttons): the full name is checked with the quote. */
export const decisionForm = z.object({
	quoteId: z.uuid('Reload the page.'),
	name: text('Your name').max(200, 'Keep your name under 200 characters.')
});

export const payKinds = ['fee', 'rest'] as const;
export type PayKind = (typeof payKinds)[number];
/** "Pay online" (superform id `pay`): the pressed button names what to pay. A string, so a missing choice is refused, never defaulted. */
export const payForm = z.object({
	quoteId: z.uuid('Reload the page.'),
	kind: z.string().refine((k) => (payKinds as readonly string[]).includes(k), 'Choose what to pay.')
});
