// Over 300 lines on purpose: a whole local stand-in of the payment service (sessions, checkout page, refunds, webhooks).
// A local stand-in for the few payment-service endpoints Tidemark uses, for the demo and tests:
// checkout sessions (create, retrieve) in the service's own wire format, so the official SDK talks
// to it unchanged (host/port/protocol options), a simple checkout page where a test payment
// succeeds, is declined or is cancelled, refunds of a paid payment (whole or part), and signed
// webhooks to the app, signed the way the service signs them (the SDK's generateTestHeaderString).
// No card fields: nothing to type, nothing stored.
import crypto from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import Stripe from 'stripe';
import { formatMoney } from '$lib/domain/money';

type LineItem = { name: string; unitAmount: number; quantity: number };

export type FakeSession = {
	id: string;
	object: 'checkout.session';
	amount_subtotal: number;
	amount_total: number;
	currency: string;
	client_reference_id: string | null;
	metadata: Record<string, string>;
	mode: 'payment';
	payment_intent: string | null;
	payment_status: 'unpaid' | 'paid';
	status: 'open' | 'complete' | 'expired';
	success_url: string;
	cancel_url: string;
	url: string | null;
	created: number;
	expires_at: number;
	livemode: false;
};

export type FakeRefund = {
	id: string;
	object: 'refund';
	amount: number;
	charge: string;
	currency: string;
	created: number;
	metadata: Record<string, string>;
	payment_intent: string;
	reason: string | null;
	status: 'pending' | 'succeeded' | 'failed' | 'canceled';
	failure_reason?: string;
};

/** The charge behind a paid session (only the fields the refund events carry). */
export type FakeCharge = {
	id: string;
	object: 'charge';
	amount: number;
	amount_captured: number;
	amount_refunded: number;
	currency: string;
	created: number;
	paid: true;
	payment_intent: string;
	refunded: boolean;
	status: 'succeeded';
	metadata: Record<string, string>;
};

export type FakeEvent = {
	id: string;
	object: 'event';
	api_version: string;
	created: number;
	type: string;
	data: { object: FakeSession | FakeRefund | FakeCharge };
	livemode: false;
	pending_webhooks: number;
	request: { id: null; idempotency_key: null };
};

export type Delivery = { eventId: string; type: string; status: number | null; error?: string; at: string };
export type Outcome = 'succeed' | 'decline' | 'cancel';

export type FakePayments = {
	/** e.g. http://127.0.0.1:40123 */
	url: string;
	host: string;
	port: number;
	secretKey: string;
	webhookSecret: string;
	sessions: Map<string, FakeSession>;
	/** Charges of paid sessions, by payment intent id. */
	charges: Map<string, FakeCharge>;
	refunds: Map<string, FakeRefund>;
	events: FakeEvent[];
	deliveries: Delivery[];
	/** What the checkout page's buttons do, for tests: the webhook is delivered before it resolves. */
	complete: (sessionId: string, outcome: Outcome) => Promise<{ redirect: string; event: FakeEvent | null }>;
	/** Resolves once every webhook the fake has started sending (e.g. after a refund) was delivered. */
	settled: () => Promise<void>;
	/** Sends an already delivered event again, exactly as signed before (a duplicate delivery). */
	redeliver: (eventId: string) => Promise<Delivery>;
	stop: () => Promise<void>;
};

export type FakePaymentsOptions = {
	/** Where to POST webhooks; a function so the app's address can be read when the event fires. */
	webhookUrl: string | (() => string);
	secretKey?: string;
	webhookSecret?: string;
};

const random = (n: number) => crypto.randomBytes(n).toString('base64url').replace(/[-_]/g, 'x');

/** Parses the service's form encoding (`line_items[0][price_data][currency]=eur`) into objects. */
export function parseForm(body: string): Record<string, unknown> {
	const root: Record<string, unknown> = {};
	for (const [key, value] of new URLSearchParams(body)) {
		const parts = key.split(/\[|\]\[|\]/).filter((p) => p !== '');
		let node = root as Record<string, unknown>;
		parts.forEach((part, i) => {
			if (i === parts.length - 1) node[part] = value;
			else node = (node[part] ??= {}) as Record<string, unknown>;
		});
	}
	return root;
}

const asArray = (v: unknown): Record<string, unknown>[] =>
	v && typeof v === 'object' ? (Object.values(v) as Record<string, unknown>[]) : [];

class ApiError extends Error {
	constructor(
		public status: number,
		message: string,
		public param?: string
	) {
		super(message);
	}
}

function sessionFromForm(form: Record<string, unknown>, base: string) {
	if (form.mode !== 'payment')
		throw new ApiError(400, 'Only mode=payment is supported by the local fake.', 'mode');
	const items: LineItem[] = asArray(form.line_items).map((li, i) => {
		const price = (li.price_data ?? {}) as Record<string, unknown>;
		const product = (price.product_data ?? {}) as Record<string, unknown>;
		const unitAmount = Number(price.unit_amount);
		const quantity = Number(li.quantity ?? 1);
		if (!Number.isSafeInteger(unitAmount) || unitAmount < 1)
			throw new ApiError(400, 'Invalid integer: unit_amount', `line_items[${i}][price_data][unit_amount]`);
		if (!Number.isSafeInteger(quantity) || quantity < 1)
			throw new ApiError(400, 'Invalid integer: quantity', `line_items[${i}][quantity]`);
		return { name: String(product.name ?? 'Item'), unitAmount, quantity };
	});
	if (items.length === 0) throw new ApiError(400, 'line_items is required.', 'line_items');
	const currencies = new Set(
		asArray(form.line_items).map((li) =>
			String((li.price_data as Record<string, unknown>)?.currency ?? '').toLowerCase()
		)
	);
	const [currency] = currencies;
	if (currencies.size !== 1 || !/^[a-z]{3}$/.test(currency))
		throw new ApiError(400, 'Invalid currency.', 'currency');
	for (const key of ['success_url', 'cancel_url'] as const) {
		try {
			if (!/^https?:$/.test(new URL(String(form[key])).protocol)) throw new Error();
		} catch {
			throw new ApiError(400, `Not a valid URL: ${key}`, key);
		}
	}
	const total = items.reduce((s, li) => s + li.unitAmount * li.quantity, 0);
	const id = `cs_test_${random(24)}`;
	const created = Math.floor(Date.now() / 1000);
	const session: FakeSession = {
		id,
		object: 'checkout.session',
		amount_subtotal: total,
		amount_total: total,
		currency,
		client_reference_id: typeof form.client_reference_id === 'string' ? form.client_reference_id : null,
		metadata: Object.fromEntries(
			Object.entries((form.metadata ?? {}) as Record<string, unknown>).map(([k, v]) => [k, String(v)])
		),
		mode: 'payment',
		payment_intent: null,
		payment_status: 'unpaid',
		status: 'open',
		success_url: String(form.success_url),
		cancel_url: String(form.cancel_url),
		url: `${base}/pay/${id}`,
		created,
		expires_at: created + 24 * 3600,
		livemode: false
	};
	return { session, items };
}

const esc = (s: string) =>
	s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

function page(title: string, body: string) {
	return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(title)}</title><style>
:root{color-scheme:light dark;--bg:#eef1f4;--card:#fff;--text:#18202b;--muted:#566170;--line:#cfd6de;--accent:#2c5a8a;--ok:#1e6b3a;--bad:#a3262a}
@media (prefers-color-scheme:dark){:root{--bg:#11161c;--card:#1b222b;--text:#e8edf2;--muted:#a3aebb;--line:#334050;--accent:#7fb0e6;--ok:#7fd49b;--bad:#f0989a}}
*{box-sizing:border-box}body{margin:0;background:var(--bg);color:var(--text);font:16px/1.5 system-ui,sans-serif}
main{max-width:28rem;margin:0 auto;padding:1.25rem 1rem 2rem}
.banner{font-size:.8rem;text-transform:uppercase;letter-spacing:.06em;color:var(--muted);margin:0 0 .75rem}
.card{background:var(--card);border:1px solid var(--line);border-radius:12px;padding:1.25rem}
h1{font-size:1.25rem;margin:0 0 .25rem}.amount{font-size:2rem;font-weight:700;margin:.25rem 0 1rem;font-variant-numeric:tabular-nums}
ul{list-style:none;padding:0;margin:0 0 1rem;border-top:1px solid var(--line)}li{display:flex;justify-content:space-between;gap:1rem;padding:.5rem 0;border-bottom:1px solid var(--line)}
li span:last-child{white-space:nowrap;font-variant-numeric:tabular-nums}
button,.link{display:flex;align-items:center;justify-content:center;width:100%;min-height:48px;margin-top:.75rem;border-radius:8px;font:inherit;font-weight:600;cursor:pointer;text-decoration:none}
.pay{background:var(--accent);color:var(--card);border:0}.secondary{background:transparent;color:var(--text);border:1px solid var(--line)}
.note{color:var(--muted);font-size:.875rem;margin:1rem 0 0}.ok{color:var(--ok)}.bad{color:var(--bad)}
</style></head><body><main><p class="banner">Test checkout · local fake payment service</p>${body}</main></body></html>`;
}

export async function startFakePayments(options: FakePaymentsOptions): Promise<FakePayments> {
	const secretKey = options.secretKey ?? `sk_test_fake_${random(24)}`;
	const webhookSecret = options.webhookSecret ?? `whsec_fake_${random(24)}`;
	const signer = new Stripe(secretKey);
	const sessions = new Map<string, FakeSession>();
	const charges = new Map<string, FakeCharge>();
	const refunds = new Map<string, FakeRefund>();
	const sending = new Set<Promise<unknown>>();
	const itemsBySession = new Map<string, LineItem[]>();
	const byIdempotencyKey = new Map<string, string>();
	const events: FakeEvent[] = [];
	const signedPayloads = new Map<string, { payload: string; header: string }>();
	const deliveries: Delivery[] = [];
	let base = '';

	async function post(eventId: string, type: string, payload: string, header: string): Promise<Delivery> {
		const target = typeof options.webhookUrl === 'function' ? options.webhookUrl() : options.webhookUrl;
		const delivery: Delivery = { eventId, type, status: null, at: new Date().toISOString() };
		try {
			const res = await fetch(target, {
				method: 'POST',
				headers: { 'content-type': 'application/json; charset=utf-8', 'stripe-signature': header },
				body: payload,
				signal: AbortSignal.timeout(10_000)
			});
			delivery.status = res.status;
			await res.arrayBuffer();
		} catch (e) {
			delivery.error = e instanceof Error ? e.message : String(e);
		}
		deliveries.push(delivery);
		return delivery;
	}

	/** Like the real service: one signed delivery now, and a few more later if the app did not take it. */
	async function emit(type: string, object: FakeEvent['data']['object']): Promise<FakeEvent> {
		const event: FakeEvent = {
			id: `evt_test_${random(24)}`,
			object: 'event',
			api_version: Stripe.API_VERSION ?? 'fake',
			created: Math.floor(Date.now() / 1000),
			type,
			data: { object: structuredClone(object) },
			livemode: false,
			pending_webhooks: 1,
			request: { id: null, idempotency_key: null }
		};
		events.push(event);
		const payload = JSON.stringify(event, null, 2);
		const header = signer.webhooks.generateTestHeaderString({ payload, secret: webhookSecret });
		signedPayloads.set(event.id, { payload, header });
		const first = await post(event.id, type, payload, header);
		if (!first.status || first.status >= 300) {
			let n = 0;
			const retry = async () => {
				// Re-signed with a fresh timestamp, as the service does for each attempt.
				const h = signer.webhooks.generateTestHeaderString({ payload, secret: webhookSecret });
				const d = await post(event.id, type, payload, h);
				if ((!d.status || d.status >= 300) && ++n < 3) setTimeout(retry, 2000 * 4 ** n).unref();
			};
			setTimeout(retry, 2000).unref();
		}
		return event;
	}

	async function complete(sessionId: string, outcome: Outcome) {
		const session = sessions.get(sessionId);
		if (!session) throw new ApiError(404, `No such checkout.session: '${sessionId}'`);
		if (session.status !== 'open') return { redirect: session.cancel_url, event: null };
		let event: FakeEvent;
		if (outcome === 'succeed') {
			const intent = `pi_test_${random(18)}`;
			Object.assign(session, {
				status: 'complete',
				payment_status: 'paid',
				payment_intent: intent,
				url: null
			});
			charges.set(intent, {
				id: `ch_test_${random(18)}`,
				object: 'charge',
				amount: session.amount_total,
				amount_captured: session.amount_total,
				amount_refunded: 0,
				currency: session.currency,
				created: Math.floor(Date.now() / 1000),
				paid: true,
				payment_intent: intent,
				refunded: false,
				status: 'succeeded',
				metadata: { ...session.metadata }
			});
			event = await emit('checkout.session.completed', session);
			return { redirect: session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id), event };
		}
		if (outcome === 'decline') {
			// The fake's stand-in for a payment the customer's bank refused after the session completed.
			Object.assign(session, {
				status: 'complete',
				payment_status: 'unpaid',
				payment_intent: `pi_test_${random(18)}`,
				url: null
			});
			event = await emit('checkout.session.async_payment_failed', session);
			return { redirect: session.cancel_url, event };
		}
		Object.assign(session, { status: 'expired', url: null });
		event = await emit('checkout.session.expired', session);
		return { redirect: session.cancel_url, event };
	}

	/**
	 * Refunds part or all of a paid charge, as the service does: refused beyond what is left
	 * unrefunded; succeeds at once (test mode); `refund.created` and then `charge.refunded` are sent
	 * after the API has answered, as separate signed events.
	 */
	function refund(form: Record<string, unknown>): FakeRefund {
		const intentId = typeof form.payment_intent === 'string' ? form.payment_intent : '';
		const charge =
			charges.get(intentId) ?? [...charges.values()].find((c) => c.id === form.charge && form.charge);
		if (!charge)
			throw new ApiError(
				400,
				`No such payment_intent: '${intentId || String(form.charge ?? '')}'`,
				'payment_intent'
			);
		const left = charge.amount - charge.amount_refunded;
		const amount = form.amount === undefined ? left : Number(form.amount);
		if (!Number.isSafeInteger(amount) || amount < 1)
			throw new ApiError(400, 'Invalid positive integer', 'amount');
		if (left === 0) throw new ApiError(400, `Charge ${charge.id} has already been refunded.`, 'charge');
		if (amount > left)
			throw new ApiError(
				400,
				`Refund amount (${amount}) is greater than unrefunded amount on charge (${left}).`,
				'amount'
			);
		const created: FakeRefund = {
			id: `re_test_${random(18)}`,
			object: 'refund',
			amount,
			charge: charge.id,
			currency: charge.currency,
			created: Math.floor(Date.now() / 1000),
			metadata: Object.fromEntries(
				Object.entries((form.metadata ?? {}) as Record<string, unknown>).map(([k, v]) => [k, String(v)])
			),
			payment_intent: charge.payment_intent,
			reason: typeof form.reason === 'string' ? form.reason : null,
			status: 'succeeded'
		};
		refunds.set(created.id, created);
		charge.amount_refunded += amount;
		charge.refunded = charge.amount_refunded === charge.amount;
		const snapshot = structuredClone(charge);
		const p = (async () => {
			await new Promise((r) => setImmediate(r));
			await emit('refund.created', created);
			await emit('charge.refunded', snapshot);
		})().finally(() => sending.delete(p));
		sending.add(p);
		return created;
	}

	function authorised(req: http.IncomingMessage) {
		return req.headers.authorization === `Bearer ${secretKey}`;
	}

	function sendJson(res: http.ServerResponse, status: number, body: unknown) {
		res.writeHead(status, { 'content-type': 'application/json', 'request-id': `req_${random(10)}` });
		res.end(JSON.stringify(body));
	}

	function sendHtml(res: http.ServerResponse, status: number, html: string) {
		res.writeHead(status, {
			'content-type': 'text/html; charset=utf-8',
			'content-security-policy':
				"default-src 'none'; style-src 'unsafe-inline'; base-uri 'none'; frame-ancestors 'none'",
			'x-content-type-options': 'nosniff',
			'cache-control': 'no-store'
		});
		res.end(html);
	}

	function checkoutPage(session: FakeSession) {
		const money = (minor: number) => formatMoney(minor, session.currency.toUpperCase(), 'en-GB');
		if (session.status !== 'open') {
			const done = session.payment_status === 'paid';
			return page(
				'Checkout closed',
				`<div class="card"><h1>${done ? 'Already paid' : 'This checkout is closed'}</h1><p class="note">${done ? 'This payment went through earlier; there is nothing more to do here.' : 'It was cancelled, declined or has expired. Start again from the shop’s page.'}</p><a class="link secondary" href="${esc(session.cancel_url)}">Back to the shop</a></div>`
			);
		}
		const items = itemsBySession.get(session.id) ?? [];
		const rows = items
			.map(
				(li) =>
					`<li><span>${esc(li.name)}${li.quantity > 1 ? ` × ${li.quantity}` : ''}</span><span>${esc(money(li.unitAmount * li.quantity))}</span></li>`
			)
			.join('');
		return page(
			`Pay ${money(session.amount_total)}`,
			`<div class="card"><h1>Pay</h1><p class="amount">${esc(money(session.amount_total))}</p><ul>${rows}</ul>
<form method="post" action="/pay/${esc(session.id)}">
<button class="pay" name="outcome" value="succeed">Pay ${esc(money(session.amount_total))} (test: succeeds)</button>
<button class="secondary" name="outcome" value="decline">Test: payment is declined</button>
<button class="secondary" name="outcome" value="cancel">Cancel and go back</button>
</form>
<p class="note">This is the local test stand-in for the payment service. No card details are asked for and no money moves.</p></div>`
		);
	}

	async function readBody(req: http.IncomingMessage) {
		const chunks: Buffer[] = [];
		let size = 0;
		for await (const c of req) {
			size += (c as Buffer).length;
			if (size > 256 * 1024) throw new ApiError(413, 'Request too large.');
			chunks.push(c as Buffer);
		}
		return Buffer.concat(chunks).toString('utf8');
	}

	const server = http.createServer(async (req, res) => {
		const url = new URL(req.url ?? '/', base);
		try {
			if (url.pathname.startsWith('/v1/') && !authorised(req)) {
				return sendJson(res, 401, {
					error: { type: 'invalid_request_error', message: 'Invalid API Key provided.' }
				});
			}
			if (req.method === 'POST' && url.pathname === '/v1/checkout/sessions') {
				const key = req.headers['idempotency-key'];
				const body = await readBody(req);
				const again = typeof key === 'string' ? byIdempotencyKey.get(key) : undefined;
				if (again) return sendJson(res, 200, sessions.get(again));
				const { session, items } = sessionFromForm(parseForm(body), base);
				sessions.set(session.id, session);
				itemsBySession.set(session.id, items);
				if (typeof key === 'string') byIdempotencyKey.set(key, session.id);
				return sendJson(res, 200, session);
			}
			if (req.method === 'POST' && url.pathname === '/v1/refunds') {
				const key = req.headers['idempotency-key'];
				const body = await readBody(req);
				const again = typeof key === 'string' ? byIdempotencyKey.get(key) : undefined;
				if (again) return sendJson(res, 200, refunds.get(again));
				const created = refund(parseForm(body));
				if (typeof key === 'string') byIdempotencyKey.set(key, created.id);
				return sendJson(res, 200, created);
			}
			const m = url.pathname.match(/^\/v1\/checkout\/sessions\/([\w]+)$/);
			if (req.method === 'GET' && m) {
				const session = sessions.get(m[1]);
				if (!session) throw new ApiError(404, `No such checkout.session: '${m[1]}'`, 'id');
				return sendJson(res, 200, session);
			}
			const p = url.pathname.match(/^\/pay\/([\w]+)$/);
			if (p) {
				const session = sessions.get(p[1]);
				if (!session)
					return sendHtml(res, 404, page('Not found', '<div class="card"><h1>No such checkout</h1></div>'));
				if (req.method === 'GET') return sendHtml(res, 200, checkoutPage(session));
				if (req.method === 'POST') {
					const outcome = new URLSearchParams(await readBody(req)).get('outcome');
					if (outcome !== 'succeed' && outcome !== 'decline' && outcome !== 'cancel')
						throw new ApiError(400, 'Choose an outcome.');
					if (session.status !== 'open') return sendHtml(res, 409, checkoutPage(session));
					const { redirect } = await complete(session.id, outcome);
					if (outcome === 'decline') {
						return sendHtml(
							res,
							200,
							page(
								'Payment declined',
								`<div class="card"><h1 class="bad">Payment declined</h1><p class="note">The test payment was declined; nothing was charged.</p><a class="link pay" href="${esc(redirect)}">Back to the shop</a></div>`
							)
						);
					}
					res.writeHead(303, { location: redirect });
					return res.end();
				}
			}
			throw new ApiError(404, `Unrecognized request URL (${req.method}: ${url.pathname}).`);
		} catch (e) {
			const status = e instanceof ApiError ? e.status : 500;
			if (status === 500) console.error('[fake payments]', e);
			const message = e instanceof Error ? e.message : 'Internal error';
			if (url.pathname.startsWith('/v1/')) {
				return sendJson(res, status, {
					error: {
						type: 'invalid_request_error',
						message,
						param: e instanceof ApiError ? e.param : undefined
					}
				});
			}
			return sendHtml(
				res,
				status,
				page(
					'Error',
					`<div class="card"><h1>Something went wrong</h1><p class="note">${esc(message)}</p></div>`
				)
			);
		}
	});

	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(0, '127.0.0.1', () => resolve());
	});
	const port = (server.address() as AddressInfo).port;
	base = `http://127.0.0.1:${port}`;

	return {
		url: base,
		host: '127.0.0.1',
		port,
		secretKey,
		webhookSecret,
		sessions,
		charges,
		refunds,
		events,
		deliveries,
		complete,
		async settled() {
			while (sending.size) await Promise.all([...sending]);
		},
		async redeliver(eventId) {
			const signed = signedPayloads.get(eventId);
			if (!signed) throw new Error(`No event ${eventId}`);
			return post(eventId, 'redelivery', signed.payload, signed.header);
		},
		stop: () =>
			new Promise<void>((resolve) => {
				server.closeAllConnections();
				server.close(() => resolve());
			})
	};
}
