import { z } from 'zod';

/** One side of a diff in the query string: a version number, or the id of a draft. */
export const versionSide = z.union([
	z.coerce
		.number({ error: 'A version is a whole number or the id of a draft.' })
		.int('A version is a whole number.')
		.min(1, 'Versions start at 1.')
		.max(1_000_000, 'No flow has that many versions.'),
	z.uuid({ error: 'A version is a whole number or the id of a draft.' })
]);

export const diffQuery = z.object({
	a: versionSide.optional(),
	b: versionSide.optional()
});
