// @ts-expect-error -- jsdom (a devDependency) ships no types and @types/jsdom is not installed.
import { JSDOM } from 'jsdom';
import { describe, expect, it } from 'vitest';
import { escapeHtml, paymentReceipt, readyToCollect, refundNotice, reportReady, safeHref } from './templates';

// A hostile value in every field a customer or staff member can type.
const nasty = `<script>alert("x")</script> & 'Quinn' <img src=x onerror=alert(1)>`;
const shop = { name: `Harbour & Sons <Repairs>`, phone: '+44 20 7946 0000', timeZone: 'UTC' };

/** Parses the HTML as a browser would (jsdom) and returns its visible text and active elements. */
function parse(html: string) {
	const doc: Document = new JSDOM(html).window.document;
	return {
		text: doc.body.textContent ?? '',
		scripts: doc.querySelectorAll('script').length,
		handlers: [...doc.querySelectorAll('*')].flatMap((el) =>
			[...el.attributes].filter((a) => a.name.startsWith('on'))
		).length,
		links: [...doc.querySelectorAll('a')].map((a) => a.getAttribute('href'))
	};
}

describe('escapeHtml', () => {
	it('replaces the five characters the OWASP XSS prevention cheat sheet (rule 1) names', () => {
		// Source: OWASP Cross Site Scripting Prevention Cheat Sheet, "Output Encoding for HTML Contexts".
		expect(escapeHtml(`&<>"'`)).toBe('&amp;&lt;&gt;&quot;&#39;');
		expect(escapeHtml('Tern 6 Pro')).toBe('Tern 6 Pro');
	});
});

describe('templates', () => {
	const report = reportReady({
		shop,
		customerName: nasty,
		jobNumber: 'J-0042',
		device: `Corvana Tern 6 Pro "blue"`,
		reportUrl: 'https://shop.example.test/r/abc?x=1&y=2',
		expiresAt: new Date('2026-12-16T12:00:00Z'),
		has: { findings: true, photos: true, quote: true }
	});

	it('shows typed values as text in the HTML, never as markup', () => {
		const html = parse(report.html);
		expect(html.scripts).toBe(0);
		expect(html.handlers).toBe(0);
		expect(html.text).toContain(`Hello ${nasty},`);
		expect(html.text).toContain('Harbour & Sons <Repairs>');
		expect(html.text).toContain('Corvana Tern 6 Pro "blue"');
		// The link survives escaping: the browser reads back the exact address.
		expect(html.links).toEqual(['https://shop.example.test/r/abc?x=1&y=2']);
	});

	it('keeps the plain-text part raw and readable, with the link on its own line', () => {
		expect(report.text).toContain(`Hello ${nasty},`);
		expect(report.text).toContain('\nhttps://shop.example.test/r/abc?x=1&y=2\n');
		expect(report.text).toContain('works until 16 December 2026');
		expect(report.subject).toBe('Your Corvana Tern 6 Pro "blue" — findings and quote (job J-0042)');
	});

	it('promises only what the page holds: before findings or a quote, "received and being examined" with the link', () => {
		const early = reportReady({
			shop,
			customerName: 'Ebba',
			jobNumber: 'TM-000007',
			device: 'Corvana Tern 6',
			reportUrl: 'https://shop.example.test/r/early',
			expiresAt: new Date('2026-12-16T12:00:00Z'),
			has: { findings: false, photos: false, quote: false }
		});
		expect(early.subject).toBe('Your Corvana Tern 6 — received and being examined (job TM-000007)');
		expect(early.text).toContain(
			'We have received your Corvana Tern 6 (job TM-000007) and are examining it.'
		);
		expect(early.text).toContain('\nhttps://shop.example.test/r/early\n');
		expect(early.text).toContain('We will write again when we have findings and a price.');
		for (const part of [early.text, parse(early.html).text]) {
			expect(part).not.toMatch(/our findings|the photos|the price are|approve the quote|pay/);
		}
		expect(parse(early.html).text).toContain('See where the job stands');
	});

	it('names the findings and photos when there are some, and says the price follows', () => {
		const m = reportReady({
			shop,
			customerName: 'Ebba',
			jobNumber: 'TM-000007',
			device: 'Corvana Tern 6',
			reportUrl: 'https://shop.example.test/r/found',
			expiresAt: new Date('2026-12-16T12:00:00Z'),
			has: { findings: true, photos: true, quote: false }
		});
		expect(m.subject).toBe('Your Corvana Tern 6 — findings (job TM-000007)');
		expect(m.text).toContain(
			'Our findings and the photos are on this private page. We will write again when we have a price.'
		);
		expect(m.text).not.toMatch(/approve the quote/);
	});

	it('the full report names findings, photos and price, and where to approve and pay', () => {
		expect(report.text).toContain(
			'Our findings, the photos and the repair we propose with its price are on this private page, where you can also approve the quote and pay.'
		);
	});

	it('refuses a link that is not http(s)', () => {
		expect(() => safeHref('javascript:alert(1)')).toThrow('Refusing a javascript: link');
		expect(() =>
			reportReady({
				shop,
				customerName: 'A',
				jobNumber: '1',
				device: 'D',
				reportUrl: 'data:text/html,x',
				expiresAt: new Date(),
				has: { findings: false, photos: false, quote: false }
			})
		).toThrow();
	});

	it('keeps subjects on one line whatever the data', () => {
		const m = readyToCollect({
			shop,
			customerName: 'A',
			jobNumber: 'J-1\r\nBcc: x@evil.test',
			device: 'Tern 5'
		});
		expect(m.subject).not.toMatch(/[\r\n]/);
	});

	it('writes the receipt amount in the currency’s own minor units', () => {
		// Source: ISO 4217 (EUR and GBP have 2 decimals, JPY has 0), formatted by CLDR en-GB via Intl.
		const base = {
			shop,
			customerName: 'Mira',
			jobNumber: 'J-0042',
			description: nasty,
			paidAt: new Date('2026-12-02T10:30:00Z'),
			paymentRef: 'p-1'
		};
		const eur = paymentReceipt({ ...base, amountMinor: 4950, currency: 'eur' });
		expect(eur.subject).toBe('Receipt: €49.50 paid to Harbour & Sons <Repairs> (job J-0042)');
		expect(eur.text).toContain('Amount:     €49.50');
		expect(parse(eur.html).text).toContain(nasty);
		expect(parse(eur.html).scripts).toBe(0);
		expect(paymentReceipt({ ...base, amountMinor: 4950, currency: 'JPY' }).text).toContain('¥4,950');
	});

	it('tells the customer what was refunded, in minor units, with the text escaped in the HTML', () => {
		// Source: ISO 4217 (EUR has 2 decimals), formatted by CLDR en-GB via Intl.
		const notice = refundNotice({
			shop,
			customerName: 'Mira',
			jobNumber: 'J-0042',
			description: nasty,
			amountMinor: 2900,
			currency: 'eur',
			refundedAt: new Date('2026-12-02T10:30:00Z'),
			paymentRef: 'p-1'
		});
		expect(notice.template).toBe('refund-notice');
		expect(notice.subject).toBe('Refund: €29.00 from Harbour & Sons <Repairs> (job J-0042)');
		expect(notice.text).toContain('Refunded:   €29.00');
		expect(notice.text).toContain('a few working days');
		expect(parse(notice.html).text).toContain(nasty);
		expect(parse(notice.html).scripts).toBe(0);
	});

	it('says what is left to pay at collection, or that nothing is', () => {
		const due = readyToCollect({
			shop,
			customerName: 'Mira',
			jobNumber: 'J-7',
			device: 'Tern 5',
			amountDueMinor: 12000,
			currency: 'gbp',
			openingHours: 'Mon–Sat 9–18'
		});
		expect(due.text).toContain('Left to pay at the counter: £120.00.');
		expect(due.text).toContain('We are open Mon–Sat 9–18.');
		const none = readyToCollect({ shop, customerName: 'Mira', jobNumber: 'J-7', device: 'Tern 5' });
		expect(none.text).toContain('There is nothing left to pay.');
		expect(none.text).not.toContain('\n\n\n');
	});
});

describe('typed values in headers and plain text', () => {
	it('lose control characters and line breaks: a subject stays one line, a name cannot add lines', () => {
		const hostile = 'Quinn\r\nBcc: x@evil.test\u0000\u001b[31m\u0085\u2028Tail';
		const mail = reportReady({
			shop: { ...shop, name: 'Harbour\r\nX-Injected: 1' },
			customerName: hostile,
			jobNumber: 'J-0042',
			device: 'Corvana\nTern 6',
			reportUrl: 'https://shop.example.test/r/abc',
			expiresAt: new Date('2026-12-16T12:00:00Z'),
			has: { findings: true, photos: true, quote: true }
		});
		expect(mail.subject).toBe('Your Corvana Tern 6 — findings and quote (job J-0042)');
		expect(mail.text).toContain('Hello Quinn Bcc: x@evil.test [31m Tail,');
		// eslint-disable-next-line no-control-regex -- looking for exactly these characters
		expect(mail.text).not.toMatch(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u2028\u2029]/);
		expect(mail.text).not.toMatch(/^Bcc:|^X-Injected:/m);
		// eslint-disable-next-line no-control-regex -- looking for exactly these characters
		expect(mail.html).not.toMatch(/[\u0000\u001b\u0085\u2028]/);
	});
});
