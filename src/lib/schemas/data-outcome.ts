/** PUT /api/jobs/:id/data — what became of the customer's data (src/lib/domain/data-first.ts). */
import { z } from 'zod';
import { storable, unstorableMessage } from '$lib/schemas/text';
import { dataOutcomes } from '$lib/domain/data-first';

export const dataOutcomeInput = z.object({
	outcome: z.enum(dataOutcomes, {
		error: 'Choose what became of the data: backed up, customer declined, or not possible.'
	}),
	note: z
		.string({ error: 'Add a note.' })
		.refine(storable, { error: unstorableMessage('The note') })
		.trim()
		.min(3, 'Add a note: where the backup went, or why there is none.')
		.max(1000, 'Keep the note under 1000 characters.'),
	/** The run the technician was in, kept in the audit entry. */
	runId: z.uuid('The run id must be a UUID.').optional()
});
export type DataOutcomeInput = z.infer<typeof dataOutcomeInput>;

/**
 * The job page's record form, as superforms validates it: the outcome a string with a check, not an
 * enum, so no choice is pre-selected (superforms would fill an enum with its first option).
 */
export const dataOutcomeForm = z.object({
	outcome: z.string().refine((v) => (dataOutcomes as readonly string[]).includes(v), {
		error: 'Choose what became of the data: backed up, customer declined, or not possible.'
	}),
	note: dataOutcomeInput.shape.note.default('')
});
