/**
 * A flow definition as `.flow.yaml` text, laid out the way authors write it: keys in the format's
 * order, steps in their given order, short lists and outcomes inline, long text as block scalars.
 * parseFlow(toFlowYaml(d)) gives back d. Isomorphic: used for downloads and the editor's YAML view.
 */
import { Document, isMap, isScalar, isSeq, Scalar, visit } from 'yaml';
import type { FlowDefinition } from './schema';

export const SCHEMA_COMMENT = 'yaml-language-server: $schema=./flow.schema.json';

const FLOW_KEYS = ['id', 'title', 'summary', 'symptoms', 'changelog', 'start', 'steps'];
const STEP_KEYS = [
	'kind',
	'title',
	'body',
	'cautions',
	'provenance',
	'minutes',
	'unit',
	'instrument',
	'domain',
	'outcomes',
	'ranges',
	'verdict'
];
const CHOICE_KEYS = ['label', 'min', 'max', 'records', 'next'];
const VERDICT_KEYS = ['code', 'severity', 'repair', 'parts', 'risks'];

function ordered<T extends object>(obj: T, keys: string[]): T {
	const rank = (k: string) => (keys.includes(k) ? keys.indexOf(k) : keys.length);
	const entries = Object.entries(obj).filter(([, v]) => v !== undefined);
	return Object.fromEntries(entries.sort(([a], [b]) => rank(a) - rank(b))) as T;
}

function layout(def: FlowDefinition) {
	const steps = Object.fromEntries(
		Object.entries(def.steps).map(([id, step]) => {
			const s = { ...step } as Record<string, unknown>;
			for (const key of ['outcomes', 'ranges'])
				if (Array.isArray(s[key])) s[key] = (s[key] as object[]).map((c) => ordered(c, CHOICE_KEYS));
			if (Array.isArray(s.provenance))
				s.provenance = (s.provenance as object[]).map((e) => ordered(e, ['about', 'basis', 'source']));
			if (s.domain) s.domain = ordered(s.domain as object, ['min', 'max']);
			if (s.verdict) s.verdict = ordered(s.verdict as object, VERDICT_KEYS);
			return [id, ordered(s, STEP_KEYS)];
		})
	);
	return ordered({ ...def, steps }, FLOW_KEYS);
}

/** Marks lists of scalars and each outcome or range as inline `[a, b]` / `{ … }` collections. */
function inlineShortCollections(node: unknown, key?: string) {
	if (isSeq(node)) {
		const scalars = node.items.every((i) => !isMap(i) && !isSeq(i));
		if (scalars) node.flow = true;
		for (const item of node.items) {
			if (isMap(item) && (key === 'outcomes' || key === 'ranges')) item.flow = true;
			inlineShortCollections(item);
		}
	} else if (isMap(node)) {
		for (const pair of node.items) {
			const k = (pair.key as { value?: unknown } | null)?.value;
			inlineShortCollections(pair.value, typeof k === 'string' ? k : undefined);
		}
	}
}

export function toFlowYaml(def: FlowDefinition): string {
	const doc = new Document(layout(def));
	inlineShortCollections(doc.contents);
	// Markdown keeps its line breaks; long one-line text (a summary with a colon) is folded, not quoted.
	visit(doc, {
		Scalar(_key, node) {
			if (typeof node.value !== 'string') return;
			if (node.value.includes('\n')) node.type = Scalar.BLOCK_LITERAL;
			else if (node.value.length > 90) node.type = Scalar.BLOCK_FOLDED;
		}
	});
	// A blank line before each step, as authors write them.
	const steps = doc.get('steps', true);
	if (isMap(steps))
		for (const pair of steps.items.slice(1)) if (isScalar(pair.key)) pair.key.spaceBefore = true;
	doc.commentBefore = ` ${SCHEMA_COMMENT}`;
	return doc.toString({ lineWidth: 100, minContentWidth: 40, flowCollectionPadding: false });
}
