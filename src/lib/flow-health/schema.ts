import { z } from 'zod';
import { kebabId } from '$lib/flows/schema';

/** The flow-health API's input: a flow id and a published (or retired) version number. */
export const healthQuery = z.object({
	id: kebabId,
	version: z.coerce
		.number({ error: 'Give the version as a whole number, e.g. version=3.' })
		.int('Give the version as a whole number, e.g. version=3.')
		.min(1, 'Versions start at 1.')
		.max(1_000_000)
});
