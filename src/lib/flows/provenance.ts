/** How a step's provenance reads on the run screen and the version page. Pure; no zod. */
import type { Provenance } from './schema';

/** "published: J-STD-033", "maker's documentation", "common practice, no published source". */
export function basisWords(entry: Pick<Provenance, 'basis' | 'source'>): string {
	const note = entry.source?.trim();
	switch (entry.basis) {
		case 'published':
			return `published: ${note || 'source not named'}`;
		case 'maker':
			return note ? `maker's documentation (${note})` : "maker's documentation: check your model's";
		default:
			// "no published source" is what the basis already says; other notes ("from memory") are kept.
			return note && !/^no published source\.?$/i.test(note)
				? `common practice, no published source (${note})`
				: 'common practice, no published source';
	}
}
