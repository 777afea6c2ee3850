import { planEvent } from '$lib/runs/plan';
import type { RunDetail, RunEventInput, RunEventResult } from '$lib/runs/types';
import type { PhotoDto } from '$lib/photos/limits';
import { seqOf, type Entry, type OutboxStore } from '$lib/offline/outbox';
import { byOrder, getStore } from '$lib/offline/idb-store';
import { drain, redo, sendEntry } from '$lib/offline/replay';
import { appendRecord, flowEventOf } from '$lib/offline/standing';
import type { RunOutbox } from './run-outbox.svelte';
import { newKey } from './keys';

const sleep = (ms: number, wake: (w: () => void) => void) =>
	new Promise<void>((r) => {
		const t = setTimeout(r, ms);
		wake(() => (clearTimeout(t), r()));
	});

/**
 * The work behind the run screen's outbox (./run-outbox.svelte.ts): keeps the entries and the
 * confirmed run in IndexedDB, sends the entries in order whenever there is a connection (one tab at
 * a time, through a Web Lock), backs off while offline, and tells the other tabs on this device
 * about every change so they show the same run. It writes its results into the outbox's state.
 */
export class OutboxEngine {
	#o: RunOutbox;
	#store = getStore();
	#channel: BroadcastChannel | undefined;
	#pumping = false;
	#wake: (() => void) | undefined;
	#writes: Promise<unknown> = Promise.resolve();
	/** Entries redone or discarded here: a store listing read before their removal landed must not bring them back. */
	#gone = new Set<string>();

	constructor(outbox: RunOutbox) {
		this.#o = outbox;
	}

	start() {
		const o = this.#o;
		o.online = navigator.onLine;
		const wake = () => {
			o.online = navigator.onLine;
			if (o.online) this.#wake?.();
			void this.pump();
		};
		addEventListener('online', wake);
		addEventListener('offline', wake);
		if (typeof BroadcastChannel !== 'undefined') {
			this.#channel = new BroadcastChannel('tidemark-outbox');
			this.#channel.onmessage = (m) => m.data === o.runId && void this.reload();
		}
		void this.reload().then(() => this.pump());
		return () => {
			removeEventListener('online', wake);
			removeEventListener('offline', wake);
			this.#channel?.close();
			this.#wake?.();
		};
	}

	/** The newer of the server's copy and this device's copy wins; the entries come from the store. */
	async reload() {
		const o = this.#o;
		const store = await this.#store;
		await this.#writes;
		const saved = await store.getBase(o.runId);
		if (saved && saved.seq > seqOf(o.base)) o.base = saved.run;
		else if (o.base.status === 'in-progress')
			await store.putBase({ runId: o.runId, seq: seqOf(o.base), run: o.base });
		this.#fromStore(await store.list(o.runId));
	}

	#fromStore(list: Entry[]) {
		const o = this.#o;
		const stored = list.filter((l) => !this.#gone.has(l.id));
		const kept = o.entries.filter((e) => o.unwritten.has(e.id) && !list.some((l) => l.id === e.id));
		o.entries = [...stored, ...kept].sort(byOrder);
	}

	#write(work: (store: OutboxStore) => Promise<void>) {
		this.#writes = this.#writes.then(async () => work(await this.#store)).catch(() => {});
		return this.#writes.then(() => this.#channel?.postMessage(this.#o.runId));
	}

	/** Writes an entry the outbox already shows, then sends what waits. */
	async persist(entry: Entry) {
		let kept = true;
		await this.#write((s) => s.put(entry).catch((e) => ((kept = false), Promise.reject(e))));
		this.#o.unwritten.delete(entry.id);
		void this.pump();
		return kept;
	}

	redo(entry: Entry) {
		const o = this.#o;
		const again = redo(entry, newKey());
		this.#gone.add(entry.id);
		o.entries = o.entries.filter((e) => e.id !== entry.id);
		o.unwritten.add(again.id);
		o.entries = [...o.entries, again];
		void this.#write((s) => s.remove(entry.id)).then(() => this.persist(again));
	}

	discard(entry: Entry) {
		this.#gone.add(entry.id);
		void this.#write((s) => s.remove(entry.id));
	}

	/** Sends what waits, in order, until nothing does; backs off (up to 8 s) while offline. */
	async pump() {
		const o = this.#o;
		if (this.#pumping) return;
		this.#pumping = true;
		try {
			for (let attempt = 0; o.mine.some((e) => !e.held);) {
				const store = await this.#store;
				await this.#writes;
				const pass = () => drain(store, o.runId, o.userId, this.#hooks);
				const result = navigator.locks
					? await navigator.locks.request(`tidemark-outbox:${o.runId}`, pass)
					: await pass();
				o.sending = false;
				this.#fromStore(await store.list(o.runId));
				if (result === 'done') {
					o.failing = false;
					attempt = 0;
					continue;
				}
				o.failing = true;
				await sleep(Math.min(8000, 500 * 2 ** attempt++), (w) => (this.#wake = w));
			}
		} finally {
			this.#pumping = false;
			o.sending = false;
		}
	}

	#hooks = {
		send: (entry: Entry) => {
			this.#o.sending = true;
			return sendEntry(this.#o.runId, entry);
		},
		onsent: (entry: Entry, body: unknown) => {
			const o = this.#o;
			o.entries = o.entries.filter((e) => e.id !== entry.id);
			if (entry.kind === 'photo') {
				const photo = (body as { photo?: PhotoDto }).photo;
				if (photo) o.uploaded = [...o.uploaded, photo];
			} else this.#confirm(entry.body, body as RunEventResult);
			this.#channel?.postMessage(o.runId);
		},
		onrefused: async (entry: Entry, held: Entry[]) => {
			this.#o.note =
				entry.kind === 'photo'
					? `A photo was not uploaded: ${entry.held?.message ?? held[0].held?.message}`
					: null;
			if (entry.kind === 'event') await this.refresh();
		}
	};

	/** The server stored an event: the base moves on with it (the server's state, our trail entry). */
	#confirm(body: RunEventInput, result: RunEventResult) {
		const o = this.#o;
		const planned = planEvent(o.base.flow.definition, o.machine, o.base.snapshot, flowEventOf(body));
		if (!planned.ok) return void this.refresh();
		const now = new Date().toISOString();
		const state = result.state ?? {};
		o.base = {
			...o.base,
			...state,
			snapshot: state.snapshot ?? planned.plan.snapshot,
			stepEnteredAt: state.stepEnteredAt ?? now,
			steps: appendRecord(o.base.steps, body, planned.plan, result.seq, now)
		};
		if (state.currentStep && state.currentStep !== planned.plan.currentStep)
			o.note = 'The server holds a different step for this run; showing where it stands.';
		if (state.status === 'abandoned') o.onended('This run was abandoned on another device.');
		const run = o.base;
		void this.#write((s) => s.putBase({ runId: o.runId, seq: result.seq, run }));
	}

	/** Fetches where the run stands on the server (after a refusal), keeping it for offline use. */
	async refresh() {
		const o = this.#o;
		try {
			const res = await fetch(`/api/runs/${o.runId}`);
			if (!res.ok) return;
			const run = (await res.json()) as RunDetail;
			o.base = run;
			await this.#write((s) => s.putBase({ runId: o.runId, seq: seqOf(run), run }));
			if (run.status === 'abandoned') o.onended('This run was abandoned on another device.');
		} catch {
			// Offline again: the held answers stay; the base is refreshed on the next refusal or reload.
		}
	}
}
