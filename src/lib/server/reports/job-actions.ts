/** The job page's customer-side actions; the route calls requireRole first and passes the user. */
import { fail, type RequestEvent } from '@sveltejs/kit';
import { z } from 'zod';
import * as quotes from '$lib/server/quotes/queries';
import { getMoney } from '$lib/server/settings/queries';
import { parseLines, type RawLine } from '$lib/quotes/input';
import * as links from './links';
import { ReportRuleError, sendReport as send } from './customer';

type User = { id: string };
const texts = (form: FormData, name: string) =>
	form.getAll(name).map((v) => (typeof v === 'string' ? v : ''));

export async function saveQuote(event: RequestEvent<{ id: string }>, user: User) {
	const form = await event.request.formData();
	const [description, kind, quantity, unit] = ['description', 'kind', 'quantity', 'unit'].map((n) =>
		texts(form, n)
	);
	const raw: RawLine[] = description.map((d, i) => ({
		description: d,
		kind: kind[i] ?? '',
		quantity: quantity[i] ?? '',
		unit: unit[i] ?? ''
	}));
	const money = await getMoney();
	const parsed = parseLines(raw, money.currency);
	if (!parsed.ok)
		return fail(400, {
			action: 'quote',
			ok: false,
			message: parsed.form ?? 'Some lines need a look; see the marked fields.',
			lineErrors: parsed.errors
		});
	const proposal = String(form.get('proposal') ?? '');
	if (proposal.length > 5000)
		return fail(400, { action: 'quote', ok: false, message: 'Keep the proposal under 5000 characters.' });
	try {
		const saved = await quotes.save(user.id, event.params.id, { lines: parsed.lines, proposal });
		return { action: 'quote', ok: true, message: `Quote version ${saved.version} saved.` };
	} catch (e) {
		if (e instanceof quotes.QuoteRuleError)
			return fail(400, { action: 'quote', ok: false, message: e.message });
		throw e;
	}
}

export async function sendReport(event: RequestEvent<{ id: string }>, user: User) {
	try {
		const { url } = await send(user.id, event.params.id);
		return {
			action: 'sendReport',
			ok: true,
			message: 'Report sent: the e-mail is in the Outbox queue.',
			url
		};
	} catch (e) {
		if (e instanceof ReportRuleError)
			return fail(e.code === 'not-found' ? 404 : 409, {
				action: 'sendReport',
				ok: false,
				message: e.message
			});
		throw e;
	}
}

export async function revokeLink(event: RequestEvent<{ id: string }>, user: User) {
	const parsed = z.object({ linkId: z.uuid() }).safeParse(Object.fromEntries(await event.request.formData()));
	if (!parsed.success) return fail(400, { action: 'revokeLink', ok: false, message: 'Choose a link.' });
	const done = await links.revoke(event.params.id, parsed.data.linkId, user.id);
	return {
		action: 'revokeLink',
		ok: true,
		message: done ? 'Link revoked: it now shows “no longer valid”.' : 'That link was already closed.'
	};
}
