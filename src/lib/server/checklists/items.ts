/**
 * The two checklists after a verdict: the repair items come from the verdict's `repair` markdown,
 * the function-test items from the device's capabilities ($lib/domain/functionTests).
 */
import { marked, type Tokens } from 'marked';
export { FUNCTION_TESTS } from '$lib/domain/functionTests';

export type ChecklistKind = 'repair' | 'function-test';
export type ChecklistDef = { key: string; label: string };

/** Inline markdown marks dropped so the label reads as plain words (it is shown as text, not HTML). */
function plain(text: string): string {
	return text
		.replace(/\[([^\]]*)\]\([^)]*\)/g, '$1')
		.replace(/[*_`~]/g, '')
		.replace(/\s+/g, ' ')
		.trim();
}

/**
 * Top-level list items of the repair markdown ("- [ ] item" or "- item"), in order. Keys are the
 * position (r1, r2 …) so a label that repeats stays two items. Nested lists belong to their parent.
 */
export function repairItems(markdown: string): ChecklistDef[] {
	const out: ChecklistDef[] = [];
	for (const token of marked.lexer(markdown ?? '')) {
		if (token.type !== 'list') continue;
		for (const item of (token as Tokens.List).items) {
			const own = item.tokens
				.filter((t) => t.type === 'text' || t.type === 'paragraph')
				.map((t) => ('text' in t ? String(t.text) : ''))
				.join(' ');
			const label = plain(own);
			if (label) out.push({ key: `r${out.length + 1}`, label });
		}
	}
	return out;
}
