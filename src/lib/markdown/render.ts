/**
 * Markdown from flows and from users, rendered to HTML that is safe to put in the page: marked
 * (GitHub-flavoured, synchronous) and then DOMPurify, on the server and in the browser alike.
 */
import DOMPurify from 'isomorphic-dompurify';
import { Marked } from 'marked';

// Our own instance, so no other module's marked.use() changes how flows render.
const marked = new Marked({ gfm: true, breaks: false, async: false });

// A task-list box is a form control: it needs an accessible name (WCAG 4.1.2), so it is named
// after its item's text, stripped of markup.
marked.use({
	renderer: {
		listitem(item) {
			if (!item.task) return false;
			const name = escapeAttribute(
				item.text
					.replace(/<[^>]*>/g, '')
					.replace(/[*_`~]/g, '')
					.replace(/\s+/g, ' ')
					.trim()
					.slice(0, 200) || 'Checklist item'
			);
			const html = this.parser.parse(item.tokens).replace('<input ', `<input aria-label="${name}" `);
			return `<li>${html}</li>\n`;
		}
	}
});

function escapeAttribute(text: string) {
	return text.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

export function renderMarkdown(source: string): string {
	const html = marked.parse(source ?? '', { async: false });
	return DOMPurify.sanitize(html, {
		USE_PROFILES: { html: true },
		// Task-list boxes stay; nothing in a step may submit, frame, style or script the page.
		FORBID_TAGS: ['style', 'form', 'iframe', 'object', 'embed', 'button', 'textarea', 'select'],
		FORBID_ATTR: ['style']
	});
}
