import { z } from 'zod';
import { kebabId } from '$lib/flows/schema';

/** A published version as named in a URL: /flows/<id>/v/<version>. */
export const versionRef = z.object({
	id: kebabId,
	version: z.coerce
		.number({ error: 'The version must be a whole number.' })
		.int('The version must be a whole number.')
		.min(1, 'Versions start at 1.')
		.max(1_000_000, 'No flow has that many versions.')
});
export type VersionRef = z.infer<typeof versionRef>;

/** The library's "Retire vN" row form: one per published version, id `retire-<version>`. */
export const retireVersion = z.object({
	version: z.coerce
		.number({ error: 'Choose a version to retire.' })
		.int('Choose a version to retire.')
		.min(1, 'Choose a version to retire.')
});
