/**
 * The outbox's replay (see ./outbox.ts for what it promises): one pass over a run's waiting
 * entries, in order, and how one entry goes to the server. Loaded only when something waits.
 */
import { nextOrder, type Entry, type OutboxStore } from './outbox';

/** How one attempt went: stored, try again later, or refused with the server's words. */
export type Sent =
	| { ok: true; body: unknown }
	| { ok: false; retry: true }
	| { ok: false; retry: false; status: number; message: string };

export type DrainHooks = {
	send: (entry: Entry) => Promise<Sent>;
	/** The server stored `entry`; called after it left the store. */
	onsent: (entry: Entry, body: unknown) => void | Promise<void>;
	/** The server refused `entry`; `held` are the entries now waiting for the technician. */
	onrefused?: (entry: Entry, held: Entry[]) => void | Promise<void>;
};

export const heldAfterRefusal = 'Not sent: it was answered after an answer the server refused.';

/**
 * One pass over the run's waiting entries, in order. Returns 'retry' when the connection (or the
 * server) failed and entries remain, 'done' otherwise. The list is read afresh, so an entry another
 * tab sent meanwhile is not sent again (and if it were, its key makes the server answer the same).
 */
export async function drain(
	store: OutboxStore,
	runId: string,
	userId: string,
	hooks: DrainHooks
): Promise<'done' | 'retry'> {
	const entries = (await store.list(runId)).filter((e) => e.userId === userId);
	const heldNow = new Set<string>();
	for (const entry of entries) {
		if (entry.held || heldNow.has(entry.id)) continue;
		const result = await hooks.send(entry);
		if (result.ok) {
			await store.remove(entry.id);
			await hooks.onsent(entry, result.body);
			continue;
		}
		if (result.retry) return 'retry';
		const refusal = { status: result.status, message: result.message };
		const held: Entry[] = [{ ...entry, held: refusal }];
		if (entry.kind === 'event')
			for (const later of entries)
				if (later.kind === 'event' && !later.held && later.order > entry.order)
					held.push({ ...later, held: { status: result.status, message: heldAfterRefusal } });
		for (const h of held) {
			heldNow.add(h.id);
			await store.put(h);
		}
		await hooks.onrefused?.(entry, held);
	}
	return 'done';
}

/** Sends one entry to its route: a step event as JSON, a photo as multipart. */
export async function sendEntry(runId: string, entry: Entry): Promise<Sent> {
	let res: Response;
	try {
		res = await fetch(
			`/api/runs/${runId}/${entry.kind === 'event' ? 'events' : 'photos'}`,
			entry.kind === 'event'
				? {
						method: 'POST',
						headers: { 'content-type': 'application/json' },
						body: JSON.stringify(entry.body)
					}
				: { method: 'POST', headers: { accept: 'application/json' }, body: photoForm(entry) }
		);
	} catch {
		return { ok: false, retry: true };
	}
	// A server fault or an expired sign-in is not the run's answer: keep it and try again.
	if (res.status >= 500 || res.status === 401) return { ok: false, retry: true };
	const body = (await res.json().catch(() => ({}))) as { message?: string };
	if (res.ok) return { ok: true, body };
	return { ok: false, retry: false, status: res.status, message: body.message ?? res.statusText };
}

function photoForm(entry: Extract<Entry, { kind: 'photo' }>) {
	const form = new FormData();
	form.set('file', new File([entry.file], entry.name, { type: entry.file.type }));
	form.set('stepId', entry.stepId);
	form.set('source', entry.source);
	if (entry.caption) form.set('caption', entry.caption);
	return form;
}

/** Puts a held entry back in the queue, as the newest, with a fresh key (the refused one is spent). */
export function redo(entry: Entry, key: string): Entry {
	const { held: _held, ...rest } = entry;
	void _held;
	const order = nextOrder();
	if (rest.kind === 'event')
		return { ...rest, id: key, order, queuedAt: Date.now(), body: { ...rest.body, idempotencyKey: key } };
	return { ...rest, id: key, order, queuedAt: Date.now() };
}
