import { describe, expect, it } from 'vitest';
import { drain, heldAfterRefusal, redo, type Sent } from './replay';
import { memoryStore } from './idb-store';
import { nextOrder, oldestAge, type Entry, type EventEntry } from './outbox';

const run = 'run-1';
const me = 'tech-1';
let n = 0;
function event(stepId: string, outcome: number, over: Partial<EventEntry> = {}): EventEntry {
	const id = `key-${++n}-${stepId}`;
	return {
		kind: 'event',
		id,
		runId: run,
		userId: me,
		order: nextOrder(),
		queuedAt: Date.now(),
		body: { type: 'ANSWER', stepId, outcome, idempotencyKey: id },
		...over
	};
}
function photo(stepId: string): Entry {
	return {
		kind: 'photo',
		id: `photo-${++n}`,
		runId: run,
		userId: me,
		order: nextOrder(),
		queuedAt: Date.now(),
		stepId,
		source: 'phone',
		caption: '',
		name: 'p.jpg',
		file: new Blob([String(n)])
	};
}

/**
 * A stand-in for the server's event route: it stores an event once per idempotency key (a repeat
 * answers the first result) and refuses an event for a step the run no longer stands on (409).
 */
function fakeServer(steps: string[]) {
	const stored: string[] = [];
	const byKey = new Map<string, number>();
	let at = 0;
	let offline = false;
	const send = async (e: Entry): Promise<Sent> => {
		if (offline) return { ok: false, retry: true };
		if (e.kind === 'photo') {
			if (!stored.includes(e.id)) stored.push(e.id);
			return { ok: true, body: {} };
		}
		const key = e.body.idempotencyKey;
		if (byKey.has(key)) return { ok: true, body: { seq: byKey.get(key) } };
		if (e.body.stepId !== steps[at]) return { ok: false, retry: false, status: 409, message: 'Moved on.' };
		stored.push(e.body.stepId);
		at++;
		byKey.set(key, stored.length);
		return { ok: true, body: { seq: stored.length } };
	};
	return {
		stored,
		send,
		setOffline: (v: boolean) => (offline = v),
		moveOn: () => stored.push(steps[at++])
	};
}

describe('the outbox replay', () => {
	it('sends the entries in the order they were made, each once, and empties the store', async () => {
		const store = memoryStore();
		const server = fakeServer(['a', 'b', 'c']);
		// Put in scrambled insertion order: the send order is the order they were made.
		const [a, b, p, c] = [event('a', 0), event('b', 1), photo('b'), event('c', 0)];
		for (const e of [c, a, p, b]) await store.put(e);
		const sent: string[] = [];
		const result = await drain(store, run, me, {
			send: server.send,
			onsent: (e) => void sent.push(e.id)
		});
		expect(result).toBe('done');
		expect(sent).toEqual([a.id, b.id, p.id, c.id]);
		expect(server.stored).toEqual(['a', 'b', p.id, 'c']);
		expect(await store.list(run)).toEqual([]);
	});

	it('keeps everything after a lost connection and resends with the same keys: no duplicates', async () => {
		const store = memoryStore();
		const server = fakeServer(['a', 'b']);
		const a = event('a', 0);
		const b = event('b', 0);
		await store.put(a);
		await store.put(b);
		// The first answer reaches the server but its reply is lost (the connection drops after).
		const lossy = async (e: Entry): Promise<Sent> => {
			const r = await server.send(e);
			server.setOffline(true);
			return e.id === a.id ? { ok: false, retry: true } : r;
		};
		expect(await drain(store, run, me, { send: lossy, onsent: () => {} })).toBe('retry');
		expect((await store.list(run)).map((e) => e.id)).toEqual([a.id, b.id]);
		server.setOffline(false);
		expect(await drain(store, run, me, { send: server.send, onsent: () => {} })).toBe('done');
		expect(server.stored).toEqual(['a', 'b']);
	});

	it('a second put of the same entry (same key) replaces it rather than adding a copy', async () => {
		const store = memoryStore();
		const a = event('a', 0);
		await store.put(a);
		await store.put({ ...a });
		expect(await store.list(run)).toHaveLength(1);
	});

	it('holds a refused event and the events after it, still sending the photos, and drops nothing', async () => {
		const store = memoryStore();
		const server = fakeServer(['a', 'b', 'c']);
		server.moveOn(); // another tablet answered "a" meanwhile
		const a = event('a', 1);
		const p = photo('a');
		const b = event('b', 0);
		for (const e of [a, p, b]) await store.put(e);
		const refused: string[] = [];
		const result = await drain(store, run, me, {
			send: server.send,
			onsent: () => {},
			onrefused: (e, held) => void refused.push(e.id, ...held.map((h) => h.id))
		});
		expect(result).toBe('done');
		expect(refused).toEqual([a.id, a.id, b.id]);
		expect(server.stored).toEqual(['a', p.id]); // the other tablet's "a" and the photo
		const left = await store.list(run);
		expect(left.map((e) => [e.id, e.held?.status, e.held?.message])).toEqual([
			[a.id, 409, 'Moved on.'],
			[b.id, 409, heldAfterRefusal]
		]);
		// A later pass does not resend held entries.
		await drain(store, run, me, { send: server.send, onsent: () => {} });
		expect(server.stored).toEqual(['a', p.id]);
	});

	it('a redone entry goes to the end with a fresh key and is sent', async () => {
		const store = memoryStore();
		const server = fakeServer(['a', 'b']);
		const held = event('b', 0, { held: { status: 409, message: 'Moved on.' } });
		await store.put(held);
		server.moveOn();
		const again = redo(held, 'fresh-key-0001');
		expect(again.held).toBeUndefined();
		expect(again.order).toBeGreaterThan(held.order);
		expect(again.kind === 'event' && again.body.idempotencyKey).toBe('fresh-key-0001');
		await store.remove(held.id);
		await store.put(again);
		await drain(store, run, me, { send: server.send, onsent: () => {} });
		expect(server.stored).toEqual(['a', 'b']);
	});

	it('sends only the signed-in technician’s entries', async () => {
		const store = memoryStore();
		const server = fakeServer(['a']);
		await store.put(event('a', 0, { userId: 'someone-else' }));
		await drain(store, run, me, { send: server.send, onsent: () => {} });
		expect(server.stored).toEqual([]);
		expect(await store.list(run)).toHaveLength(1);
	});

	it('orders entries made in the same millisecond and measures the oldest one’s age', () => {
		const t = 1_700_000_000_000;
		const first = nextOrder(t);
		expect(nextOrder(t)).toBeGreaterThan(first);
		const e = (queuedAt: number) => ({ ...event('a', 0), queuedAt });
		expect(oldestAge([e(t - 5000), e(t - 1000)], t)).toBe(5000);
		expect(oldestAge([], t)).toBe(0);
	});
});
