import { parse } from 'yaml';

/**
 * The symptom tags intake may offer: every `symptoms` entry of the flow files in flows/. The files
 * are embedded at build time (like the migrations), so `node build` needs no flows folder at run
 * time. Read once, on first use.
 */
const files = import.meta.glob<string>('/flows/*.flow.yaml', {
	eager: true,
	query: '?raw',
	import: 'default'
});

let vocabulary: string[] | undefined;

export function symptomVocabulary(): string[] {
	if (vocabulary) return vocabulary;
	const tags = new Set<string>();
	for (const [name, text] of Object.entries(files)) {
		try {
			const doc = parse(text, { maxAliasCount: 50 }) as { symptoms?: unknown } | null;
			if (Array.isArray(doc?.symptoms)) {
				for (const tag of doc.symptoms) if (typeof tag === 'string') tags.add(tag);
			}
		} catch (e) {
			// A broken flow file is the flows checker's business; intake keeps the other tags.
			console.error(`[jobs] could not read symptoms from ${name}:`, e);
		}
	}
	vocabulary = [...tags].sort();
	return vocabulary;
}
