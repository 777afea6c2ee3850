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

/** A change to an entry: label, group and whether it is retired (no longer offered at intake). */
export const symptomEdit = z.object({
	label,
	group,
	retired: z.preprocess((v) => v === true || v === 'on' || v === 'true', z.boolean())
});
export type SymptomEdit = z.infer<typeof symptomEdit>;
