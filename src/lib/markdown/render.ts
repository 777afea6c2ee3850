/**
 * Markdown from flows and from users, rendered to HTML that is safe to put in the page: marked
 * (GitHub-flavoured, synchronous) and then DOMPurify, on the server and in the browser alike.
 */
import DOMPurify from 'isomorphic-dompurify';
import { Marked } from 'marked';

// Our own instance, so no other module's marked.use() changes how flows render.
const marked = new Marked({ gfm: true, breaks: false, async: false });

export function renderMarkdown(source: string): string {
	const html = marked.parse(source ?? '', { async: false });
	return DOMPurify.sanitize(html, {
		USE_PROFILES: { html: true },
		// Task-list boxes stay; nothing in a step may submit, frame, style or script the page.
		FORBID_TAGS: ['style', 'form', 'iframe', 'object', 'embed', 'button', 'textarea', 'select'],
		FORBID_ATTR: ['style']
	});
}
