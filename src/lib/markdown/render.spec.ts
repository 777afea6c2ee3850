import { describe, expect, it } from 'vitest';
import { renderMarkdown } from './render';

describe('renderMarkdown', () => {
	it('renders GitHub-flavoured markdown: emphasis, lists and task boxes', () => {
		const html = renderMarkdown('1. **Disconnect** the battery\n2. Then *look*\n\n- [ ] checked later');
		expect(html).toContain('<strong>Disconnect</strong>');
		expect(html).toContain('<em>look</em>');
		expect(html).toMatch(/<ol>\s*<li>/);
		expect(html).toMatch(/<input[^>]*type="checkbox"/);
	});

	it('names each task box after its item, so the box has an accessible name (WCAG 4.1.2)', () => {
		const html = renderMarkdown('- [ ] Fit **new** adhesive\n- [x] Photo "before" & after\n- plain');
		expect(html).toMatch(/<input aria-label="Fit new adhesive"[^>]*type="checkbox"/);
		expect(html).toMatch(/<input aria-label="Photo &quot;before&quot; &amp; after"[^>]*checked/);
		expect(html).toContain('<li>plain</li>');
	});

	// Payloads from the OWASP XSS Filter Evasion Cheat Sheet (common forms, quoted from memory).
	it.each([
		'<script>alert(1)</script>',
		'<img src=x onerror=alert(1)>',
		'[click](javascript:alert(1))',
		'<a href="javascript:alert(1)">x</a>',
		'<svg onload=alert(1)>',
		'<iframe src="javascript:alert(1)"></iframe>',
		'<div style="background:url(javascript:alert(1))">x</div>',
		'<form action="javascript:alert(1)"><button>go</button></form>'
	])('removes script from %s', (payload) => {
		const html = renderMarkdown(`Step text\n\n${payload}`);
		expect(html).toContain('Step text');
		expect(html).not.toMatch(/<script|onerror|onload|javascript:|<iframe|<form|style=/i);
	});
});
