// Over 300 lines on purpose: one template per e-mail, each as text and HTML.
// The app's own e-mails, each as plain text and HTML from one set of typed data. Every value that
// reaches the HTML goes through escapeHtml (or safeHref for links); the subject is one line.
import { formatMoney } from '$lib/domain/money';

export type RenderedMail = { template: TemplateName; subject: string; text: string; html: string };
export type TemplateName = 'report-ready' | 'payment-receipt' | 'refund-notice' | 'ready-to-collect' | 'test';

/** Shop details every mail signs with. */
export type ShopInfo = { name: string; phone?: string; address?: string; locale?: string; timeZone?: string };

const entities: Record<string, string> = {
	'&': '&amp;',
	'<': '&lt;',
	'>': '&gt;',
	'"': '&quot;',
	"'": '&#39;'
};

export function escapeHtml(value: string): string {
	return value.replace(/[&<>"']/g, (c) => entities[c]);
}

/** Only http(s) links go into a mail; anything else (javascript:, data:) is a programming error. */
export function safeHref(url: string): string {
	const parsed = new URL(url);
	if (parsed.protocol !== 'https:' && parsed.protocol !== 'http:') {
		throw new Error(`Refusing a ${parsed.protocol} link in an e-mail.`);
	}
	return parsed.toString();
}

// Control characters (C0, DEL, C1) and line or paragraph separators in a value typed by a customer
// or by staff would start a new header line in a subject, or hide text in a plain-text part.
const CONTROL = /[\p{Cc}\u2028\u2029]+/gu;

/** One line with no control characters: for every header and for a typed value in a mail body. */
export function headerText(s: string): string {
	return s.replace(CONTROL, ' ').replace(/ {2,}/g, ' ').trim();
}

const oneLine = headerText;

/** The typed values a template receives, each cleaned to one line (the shop's address keeps its lines). */
function typed<T extends { shop: ShopInfo }>(d: T): T {
	const out: Record<string, unknown> = { ...d };
	for (const [k, v] of Object.entries(d)) if (typeof v === 'string') out[k] = headerText(v);
	const shop = d.shop;
	out.shop = {
		...shop,
		name: headerText(shop.name),
		phone: shop.phone && headerText(shop.phone),
		address: shop.address?.split(/\r?\n/).map(headerText).filter(Boolean).join('\n')
	};
	return out as T;
}

function formatDate(d: Date, shop: ShopInfo) {
	return new Intl.DateTimeFormat(shop.locale ?? 'en-GB', {
		dateStyle: 'long',
		timeZone: shop.timeZone
	}).format(d);
}
function formatDateTime(d: Date, shop: ShopInfo) {
	return new Intl.DateTimeFormat(shop.locale ?? 'en-GB', {
		dateStyle: 'long',
		timeStyle: 'short',
		timeZone: shop.timeZone
	}).format(d);
}

function signatureText(shop: ShopInfo) {
	return [shop.name, shop.address, shop.phone].filter(Boolean).join('\n');
}

/** Simple, table-free HTML with inline styles: mail programs ignore <style> blocks and page CSS. */
function layout(shop: ShopInfo, title: string, body: string): string {
	const footer = [shop.address, shop.phone]
		.filter(Boolean)
		.map((s) => escapeHtml(s!))
		.join(' · ');
	return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${escapeHtml(title)}</title></head>
<body style="margin:0;padding:0;background:#f4f1ea;color:#1d2430;font-family:Helvetica,Arial,sans-serif;font-size:16px;line-height:1.5">
<div style="max-width:560px;margin:0 auto;padding:24px 16px">
<p style="margin:0 0 16px;font-weight:bold;color:#1f4e5f">${escapeHtml(shop.name)}</p>
<div style="background:#ffffff;border:1px solid #d9d3c7;border-radius:8px;padding:24px">
${body}
</div>
${footer ? `<p style="margin:16px 0 0;font-size:13px;color:#5b6472">${footer}</p>` : ''}
</div>
</body></html>`;
}

function button(href: string, label: string) {
	return `<p style="margin:24px 0"><a href="${escapeHtml(safeHref(href))}" style="display:inline-block;background:#1f4e5f;color:#ffffff;text-decoration:none;padding:12px 20px;border-radius:6px;font-weight:bold">${escapeHtml(label)}</a></p>
<p style="margin:0 0 16px;font-size:13px;color:#5b6472">If the button does not work, copy this address into your browser:<br><span style="word-break:break-all">${escapeHtml(safeHref(href))}</span></p>`;
}

const p = (html: string) => `<p style="margin:0 0 16px">${html}</p>`;

export type ReportReadyData = {
	shop: ShopInfo;
	customerName: string;
	jobNumber: string;
	device: string;
	reportUrl: string;
	expiresAt: Date;
	/** What the linked page holds right now: the mail promises nothing more. */
	has: { findings: boolean; photos: boolean; quote: boolean };
};

/** "a, b and c". */
const listed = (items: string[]) =>
	items.length < 2 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items.at(-1)}`;

/**
 * The private link to the job's report. It says what the page holds at the moment it is sent: before
 * there are findings or a quote, only that the phone was received and is being examined.
 */
export function reportReady(d: ReportReadyData): RenderedMail {
	d = typed(d);
	const { findings, photos, quote } = d.has;
	const parts = [
		findings && 'our findings',
		photos && 'the photos',
		quote && 'the repair we propose with its price'
	].filter((x): x is string => Boolean(x));
	const what =
		findings && quote
			? 'findings and quote'
			: findings
				? 'findings'
				: quote
					? 'quote'
					: 'received and being examined';
	const subject = oneLine(`Your ${d.device} — ${what} (job ${d.jobNumber})`);
	const until = formatDate(d.expiresAt, d.shop);
	const intro = (device: string, job: string) => {
		const said = [
			findings
				? `We have examined your ${device} (job ${job}).`
				: `We have received your ${device} (job ${job}) and are examining it.`
		];
		if (parts.length === 0) {
			said.push(
				'This private page shows what you told us when you handed it in and where the job stands. We will write again when we have findings and a price.'
			);
		} else {
			const list = listed(parts);
			said.push(
				`${list[0].toUpperCase()}${list.slice(1)} ${parts.length === 1 ? 'is' : 'are'} on this private page${quote ? ', where you can also approve the quote and pay' : ''}.`
			);
			if (!quote) said.push('We will write again when we have a price.');
		}
		return said.join(' ');
	};
	const buttonLabel = findings ? 'Read the findings' : quote ? 'See the quote' : 'See where the job stands';
	const text = `Hello ${d.customerName},

${intro(d.device, d.jobNumber)}

${safeHref(d.reportUrl)}

The link is for you alone and works until ${until}. Until we have spoken, please do not try to charge the phone or switch it on.

${signatureText(d.shop)}
`;
	const html = layout(
		d.shop,
		subject,
		[
			p(`Hello ${escapeHtml(d.customerName)},`),
			p(
				intro(
					`<strong>${escapeHtml(d.device)}</strong>`,
					`<span style="font-family:monospace">${escapeHtml(d.jobNumber)}</span>`
				)
			),
			button(d.reportUrl, buttonLabel),
			p(
				`The link is for you alone and works until ${escapeHtml(until)}. Until we have spoken, please do not try to charge the phone or switch it on.`
			)
		].join('\n')
	);
	return { template: 'report-ready', subject, text, html };
}

type Fact = [label: string, value: string, mono?: boolean];

/** The facts of a money mail: aligned lines for the plain text, a two-column table for the HTML. */
function facts(list: Fact[]) {
	const text = list.map(([k, v]) => `  ${`${k}:`.padEnd(12)}${v}`).join('\n');
	const rows = list
		.map(
			([k, v, mono]) =>
				`<tr><td style="padding:4px 16px 4px 0;color:#5b6472;vertical-align:top">${k}</td><td style="padding:4px 0${mono ? ';font-family:monospace' : ''}">${escapeHtml(v)}</td></tr>`
		)
		.join('');
	return { text, html: `<table style="border-collapse:collapse;margin:0 0 16px">${rows}</table>` };
}

export type PaymentReceiptData = {
	shop: ShopInfo;
	customerName: string;
	jobNumber: string;
	description: string;
	amountMinor: number;
	currency: string;
	paidAt: Date;
	/** Our payment id, to quote when asking about the payment. */
	paymentRef: string;
};

/** A receipt after a confirmed payment. */
export function paymentReceipt(d: PaymentReceiptData): RenderedMail {
	d = typed(d);
	const amount = formatMoney(d.amountMinor, d.currency.toUpperCase(), d.shop.locale ?? 'en-GB');
	const when = formatDateTime(d.paidAt, d.shop);
	const subject = oneLine(`Receipt: ${amount} paid to ${d.shop.name} (job ${d.jobNumber})`);
	const f = facts([
		['For', d.description],
		['Job', d.jobNumber, true],
		['Amount', amount],
		['Paid', when],
		['Reference', d.paymentRef, true]
	]);
	const text = `Hello ${d.customerName},

Thank you: we have received your payment.

${f.text}

Please keep this mail as your receipt.

${signatureText(d.shop)}
`;
	const html = layout(
		d.shop,
		subject,
		[
			p(`Hello ${escapeHtml(d.customerName)},`),
			p('Thank you: we have received your payment.'),
			f.html,
			p('Please keep this mail as your receipt.')
		].join('\n')
	);
	return { template: 'payment-receipt', subject, text, html };
}

export type RefundNoticeData = Omit<PaymentReceiptData, 'paidAt'> & { refundedAt: Date };

/** A refund confirmed by the payment service: how much went back, and that banks take a few days. */
export function refundNotice(d: RefundNoticeData): RenderedMail {
	d = typed(d);
	const amount = formatMoney(d.amountMinor, d.currency.toUpperCase(), d.shop.locale ?? 'en-GB');
	const when = formatDateTime(d.refundedAt, d.shop);
	const subject = oneLine(`Refund: ${amount} from ${d.shop.name} (job ${d.jobNumber})`);
	const f = facts([
		['For', d.description],
		['Job', d.jobNumber, true],
		['Refunded', amount],
		['On', when],
		['Reference', d.paymentRef, true]
	]);
	const text = `Hello ${d.customerName},

We have refunded ${amount} of your payment. It goes back the way you paid; your bank or card
issuer may take a few working days to show it.

${f.text}

${signatureText(d.shop)}
`;
	const html = layout(
		d.shop,
		subject,
		[
			p(`Hello ${escapeHtml(d.customerName)},`),
			p(
				`We have refunded <strong>${escapeHtml(amount)}</strong> of your payment. It goes back the way you paid; your bank or card issuer may take a few working days to show it.`
			),
			f.html
		].join('\n')
	);
	return { template: 'refund-notice', subject, text, html };
}

export type ReadyToCollectData = {
	shop: ShopInfo;
	customerName: string;
	jobNumber: string;
	device: string;
	/** Left to pay at the counter, if anything. */
	amountDueMinor?: number;
	currency?: string;
	openingHours?: string;
};

/** The phone is ready to collect. */
export function readyToCollect(d: ReadyToCollectData): RenderedMail {
	d = typed(d);
	const due =
		d.amountDueMinor && d.amountDueMinor > 0 && d.currency
			? formatMoney(d.amountDueMinor, d.currency.toUpperCase(), d.shop.locale ?? 'en-GB')
			: null;
	const subject = oneLine(`Your ${d.device} is ready to collect (job ${d.jobNumber})`);
	const text = [
		`Hello ${d.customerName},`,
		`Your ${d.device} (job ${d.jobNumber}) is ready to collect.`,
		due ? `Left to pay at the counter: ${due}.` : 'There is nothing left to pay.',
		d.openingHours ? `We are open ${d.openingHours}.` : '',
		'Please bring this mail or your job number with you.',
		signatureText(d.shop)
	]
		.filter(Boolean)
		.join('\n\n');
	const html = layout(
		d.shop,
		subject,
		[
			p(`Hello ${escapeHtml(d.customerName)},`),
			p(
				`Your <strong>${escapeHtml(d.device)}</strong> (job <span style="font-family:monospace">${escapeHtml(d.jobNumber)}</span>) is ready to collect.`
			),
			p(
				due
					? `Left to pay at the counter: <strong>${escapeHtml(due)}</strong>.`
					: 'There is nothing left to pay.'
			),
			d.openingHours ? p(`We are open ${escapeHtml(d.openingHours)}.`) : '',
			p('Please bring this mail or your job number with you.')
		].join('\n')
	);
	return { template: 'ready-to-collect', subject, text: text + '\n', html };
}

/** A test message a lead sends from the Outbox to check the mail settings. */
export function testMessage(d: { shop: ShopInfo; sentBy: string }): RenderedMail {
	d = typed(d);
	const subject = oneLine(`Test message from ${d.shop.name}`);
	const text = `This is a test message sent by ${d.sentBy} from the Tidemark Outbox.\nIf you can read it, the shop's e-mail settings work.\n\n${signatureText(d.shop)}\n`;
	const html = layout(
		d.shop,
		subject,
		[
			p(`This is a test message sent by ${escapeHtml(d.sentBy)} from the Tidemark Outbox.`),
			p("If you can read it, the shop's e-mail settings work.")
		].join('\n')
	);
	return { template: 'test', subject, text, html };
}
