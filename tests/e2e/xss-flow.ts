/**
 * A flow whose markdown carries common XSS payloads, for tests/e2e/xss.spec.ts. Each payload
 * would set `window.__xss` (or open a dialog) if it ran.
 */
export const PAYLOADS = [
	'<script>window.__xss = "script"; alert("script")</script>',
	'<img src="x" onerror="window.__xss = \'img\'; alert(\'img\')">',
	"[a javascript link](javascript:window.__xss='md-link';alert(1))",
	'<a href="javascript:window.__xss=\'a-link\';alert(1)">an html javascript link</a>',
	'<svg onload="window.__xss = \'svg\'; alert(\'svg\')"><circle r="4"></circle></svg>',
	'<iframe src="javascript:parent.__xss=\'iframe\';alert(1)"></iframe>',
	'<iframe srcdoc="<script>parent.__xss=\'srcdoc\'</script>"></iframe>',
	'<details open ontoggle="window.__xss = \'details\'"><summary>x</summary></details>',
	'<math><mtext><table><mglyph><style><img src=x onerror="window.__xss=\'mxss\'"></style></mglyph></table></mtext></math>'
];

export const body = ['Payloads below must show as harmless text or not at all.', ...PAYLOADS].join('\n\n');

export const xssFlow = {
	id: 'xss-payloads-in-markdown',
	title: 'Markdown payloads',
	summary: body,
	symptoms: ['no-power'],
	start: 'look',
	steps: {
		look: {
			kind: 'symptom',
			title: 'Look at the phone',
			body,
			minutes: 1,
			outcomes: [{ label: 'Looked', next: 'done' }]
		},
		done: {
			kind: 'verdict',
			title: 'Payload verdict',
			verdict: { code: 'payload-verdict', severity: 'no-fault', repair: body, risks: body }
		}
	}
};
