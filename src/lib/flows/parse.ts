/**
 * parseFlow: YAML text → validated definition, or `schema` problems with line numbers.
 * Safe by construction: YAML 1.2 core schema only (no custom or language tags), duplicate keys
 * refused, a size cap, and a cap on alias expansion against "billion laughs" documents.
 */
import { isAlias, isMap, isSeq, LineCounter, parseDocument, type Document, type Node } from 'yaml';
import { checkFlow, validateFlow, type CheckOptions, type CheckResult } from './check';
import type { FlowPath, FlowProblem } from './problems';
import type { FlowDefinition } from './schema';

export const MAX_FLOW_CHARS = 512_000;
const MAX_ALIASES = 20;

export interface Position {
	line: number;
	column: number;
}
/** Position in the text of the deepest node along `path` that exists. */
export type Locate = (path: FlowPath | undefined) => Position | undefined;

export type ParseResult =
	| { ok: true; definition: FlowDefinition; locate: Locate }
	| { ok: false; problems: FlowProblem[]; locate: Locate };

const nowhere: Locate = () => undefined;

export function parseFlow(text: string): ParseResult {
	if (text.length > MAX_FLOW_CHARS)
		return {
			ok: false,
			locate: nowhere,
			problems: [
				{
					code: 'schema',
					message: `The file has ${text.length} characters; a flow may have at most ${MAX_FLOW_CHARS}.`
				}
			]
		};

	const lineCounter = new LineCounter();
	const doc = parseDocument(text, {
		lineCounter,
		version: '1.2',
		schema: 'core',
		merge: false,
		uniqueKeys: true,
		prettyErrors: true
	});
	const locate: Locate = (path) => position(doc, lineCounter, path ?? []);

	// Warnings include unresolved tags such as `!!js/function`: refuse them too.
	const yamlIssues = [...doc.errors, ...doc.warnings];
	if (yamlIssues.length)
		return {
			ok: false,
			locate,
			problems: yamlIssues.map((e) => {
				const at = e.linePos?.[0];
				return {
					code: 'schema',
					message: `YAML: ${e.message.split('\n')[0]}`,
					...(at && { line: at.line, column: at.col })
				};
			})
		};

	let data: unknown;
	try {
		data = doc.toJS({ maxAliasCount: MAX_ALIASES });
	} catch (e) {
		const message = e instanceof Error ? e.message : String(e);
		return { ok: false, locate, problems: [{ code: 'schema', message: `YAML: ${message}` }] };
	}

	const valid = validateFlow(data);
	if (!valid.ok) return { ok: false, locate, problems: withLines(valid.problems, locate) };
	return { ok: true, definition: valid.definition, locate };
}

/** Adds line and column to every problem that has a path. */
export function withLines(problems: FlowProblem[], locate: Locate): FlowProblem[] {
	return problems.map((p) => {
		const at = p.line === undefined ? locate(p.path) : undefined;
		if (!at) return p;
		return { ...p, line: at.line, column: at.column, message: `${p.message} (line ${at.line})` };
	});
}

/** parseFlow then checkFlow, every problem located in the text. For the CLI and the importer. */
export function checkFlowText(text: string, options: CheckOptions = {}): CheckResult {
	const parsed = parseFlow(text);
	if (!parsed.ok) return { ok: false, problems: parsed.problems, stats: null };
	const result = checkFlow(parsed.definition, options);
	return { ...result, problems: withLines(result.problems, parsed.locate) };
}

function position(doc: Document, lines: LineCounter, path: FlowPath): Position | undefined {
	let node: unknown = doc.contents;
	let offset: number | undefined = (node as Node | null)?.range?.[0];
	for (const key of path) {
		if (isAlias(node)) node = node.resolve(doc);
		if (isMap(node)) {
			const pair = node.items.find((p) => (p.key as { value?: unknown } | null)?.value === key);
			if (!pair) break;
			offset = (pair.key as Node).range?.[0] ?? offset;
			node = pair.value;
		} else if (isSeq(node) && typeof key === 'number' && node.items[key]) {
			node = node.items[key];
			offset = (node as Node).range?.[0] ?? offset;
		} else break;
	}
	if (offset === undefined) return undefined;
	const { line, col } = lines.linePos(offset);
	return { line, column: col };
}
