import { z } from 'zod';

const label = z
	.string()
	.trim()
	.min(2, 'Write what the customer or the technician sees, in a few words.')
	.max(80, 'Use at most 80 characters.');
const group = z
	.string()
	.trim()
	.min(2, 'Name the group (for example “Power and start”).')
	.max(40, 'Use at most 40 characters.');

/** A new catalogue entry. The code is what jobs store and flows tag: kebab-case, never renamed. */
export const symptomAdd = z.object({
	code: z
		.string()
		.trim()
		.toLowerCase()
		.min(2, 'Give a short code, like “no-vibration”.')
		.max(60, 'Use at most 60 characters.')
		.regex(
			/^[a-z0-9]+(-[a-z0-9]+)*$/,
			'Use lower-case letters, digits and single dashes, like “no-vibration”.'
		),
	label,
	group
});
export type SymptomAdd = z.infer<typeof symptomAdd>;

/**
 * A change to an entry: which one (its code, posted hidden), label, group and whether it is retired
 * (no longer offered at intake). A plain boolean: superforms reads a ticked checkbox as true.
 */
export const symptomEdit = z.object({
	code: z.string().trim().min(1, 'Choose a symptom to change.').max(60, 'Choose a symptom to change.'),
	label,
	group,
	retired: z.boolean().default(false)
});
export type SymptomEdit = z.infer<typeof symptomEdit>;
