import { compileFlow } from '$lib/flows/machine';
import { planEvent } from '$lib/runs/plan';
import type { RunDetail, RunEventInput, RunEventResult } from '$lib/runs/types';
import type { PhotoDto } from '$lib/photos/limits';
import { byOrder, nextOrder, redo, seqOf, type Entry, type OutboxStore } from '$lib/offline/outbox';
import { appendRecord, flowEventOf } from '$lib/offline/standing';
import { newKey } from './keys';

const sleep = (ms: number, wake: (w: () => void) => void) =>
	new Promise<void>((r) => {
		const t = setTimeout(r, ms);
		wake(() => (clearTimeout(t), r()));
	});

/**
 * The run screen's side of the outbox (src/lib/offline/outbox.ts): it holds the confirmed run (the
 * base) and this run's waiting entries as reactive state, keeps them in IndexedDB, sends them in
 * order whenever there is a connection (one tab at a time, through a Web Lock), and tells the
 * other tabs on this device about every change so they show the same run.
 */
export class RunOutbox {
	base = $state.raw<RunDetail>() as RunDetail;
	entries = $state.raw<Entry[]>([]);
	/** What the browser says about the network. */
	online = $state(true);
	/** The last attempt failed for want of a connection (or a server error). */
	failing = $state(false);
	sending = $state(false);
	/** Photos stored by the server from this queue, for the photo grid. */
	uploaded = $state.raw<PhotoDto[]>([]);
	/** Something the technician should read (the server holds another step, a refusal). */
	note = $state<string | null>(null);
	/** False when the browser has no IndexedDB: the queue then lives only as long as the page. */
	persistent = typeof indexedDB !== 'undefined';

	readonly runId: string;
	readonly userId: string;
	readonly machine;
	#opened: Promise<OutboxStore> | undefined;
	#channel: BroadcastChannel | undefined;
	#pumping = false;
	#wake: (() => void) | undefined;
	#writes: Promise<unknown> = Promise.resolve();

	readonly onended: (message: string) => void;
	/** Entries pushed but not yet written: a list read from the store meanwhile must keep them. */
	#unwritten = new Set<string>();

	constructor(run: RunDetail, userId: string, onended: (message: string) => void) {
		this.onended = onended;
		this.base = run;
		this.runId = run.id;
		this.userId = userId;
		this.machine = compileFlow(run.flow.definition);
	}

	/** Opened on first use in the browser: the IndexedDB code is not part of the first paint (bench/runs). */
	get #store() {
		return (this.#opened ??= import('$lib/offline/idb-store').then((m) => m.getStore()));
	}

	get mine() {
		return this.entries.filter((e) => e.userId === this.userId);
	}

	/** Reads what this device holds for the run, starts listening, and sends what waits. */
	start() {
		this.online = navigator.onLine;
		const wake = () => {
			this.online = navigator.onLine;
			if (this.online) this.#wake?.();
			void this.pump();
		};
		addEventListener('online', wake);
		addEventListener('offline', wake);
		if (typeof BroadcastChannel !== 'undefined') {
			this.#channel = new BroadcastChannel('tidemark-outbox');
			this.#channel.onmessage = (m) => m.data === this.runId && void this.reload();
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
		const store = await this.#store;
		await this.#writes;
		const saved = await store.getBase(this.runId);
		if (saved && saved.seq > seqOf(this.base)) this.base = saved.run;
		else if (this.base.status === 'in-progress')
			await store.putBase({ runId: this.runId, seq: seqOf(this.base), run: this.base });
		this.#fromStore(await store.list(this.runId));
	}

	#fromStore(list: Entry[]) {
		const kept = this.entries.filter((e) => this.#unwritten.has(e.id) && !list.some((l) => l.id === e.id));
		this.entries = [...list, ...kept].sort(byOrder);
	}

	#changed() {
		this.#channel?.postMessage(this.runId);
	}

	#write(work: (store: OutboxStore) => Promise<void>) {
		this.#writes = this.#writes.then(async () => work(await this.#store)).catch(() => {});
		return this.#writes.then(() => this.#changed());
	}

	/** Queues a step event the screen has already planned; the screen moves on at once. */
	pushEvent(body: RunEventInput) {
		const entry: Entry = {
			kind: 'event',
			id: body.idempotencyKey,
			runId: this.runId,
			userId: this.userId,
			order: nextOrder(),
			queuedAt: Date.now(),
			body
		};
		this.#add(entry);
		void this.#write((s) => s.put(entry))
			.then(() => this.#unwritten.delete(entry.id))
			.then(() => this.pump());
	}

	/** Queues a photo (already checked against the size limit) until it can be uploaded. */
	async pushPhoto(file: File, fields: { stepId: string; source: 'phone' | 'microscope'; caption: string }) {
		const entry: Entry = {
			kind: 'photo',
			id: newKey(),
			runId: this.runId,
			userId: this.userId,
			order: nextOrder(),
			queuedAt: Date.now(),
			name: file.name || 'photo',
			file,
			...fields
		};
		this.#add(entry);
		await this.#write((s) => s.put(entry));
		this.#unwritten.delete(entry.id);
		void this.pump();
	}

	#add(entry: Entry) {
		this.#unwritten.add(entry.id);
		this.entries = [...this.entries, entry];
	}

	redo(entry: Entry) {
		const again = redo(entry, newKey());
		this.entries = this.entries.filter((e) => e.id !== entry.id);
		this.#add(again);
		void this.#write(async (s) => {
			await s.remove(entry.id);
			await s.put(again);
		})
			.then(() => this.#unwritten.delete(again.id))
			.then(() => this.pump());
	}

	discard(entry: Entry) {
		this.entries = this.entries.filter((e) => e.id !== entry.id);
		void this.#write((s) => s.remove(entry.id));
	}

	/** Sends what waits, in order, until nothing does; backs off (up to 8 s) while offline. */
	async pump() {
		if (this.#pumping) return;
		this.#pumping = true;
		try {
			for (let attempt = 0; this.mine.some((e) => !e.held);) {
				const [store, { drain }] = await Promise.all([this.#store, import('$lib/offline/replay')]);
				await this.#writes;
				const pass = () => drain(store, this.runId, this.userId, this.#hooks);
				const result = navigator.locks
					? await navigator.locks.request(`tidemark-outbox:${this.runId}`, pass)
					: await pass();
				this.sending = false;
				this.#fromStore(await store.list(this.runId));
				if (result === 'done') {
					this.failing = false;
					attempt = 0;
					continue;
				}
				this.failing = true;
				await sleep(Math.min(8000, 500 * 2 ** attempt++), (w) => (this.#wake = w));
			}
		} finally {
			this.#pumping = false;
			this.sending = false;
		}
	}

	#hooks = {
		send: async (entry: Entry) => {
			this.sending = true;
			return (await import('$lib/offline/replay')).sendEntry(this.runId, entry);
		},
		onsent: (entry: Entry, body: unknown) => {
			this.entries = this.entries.filter((e) => e.id !== entry.id);
			if (entry.kind === 'photo') {
				const photo = (body as { photo?: PhotoDto }).photo;
				if (photo) this.uploaded = [...this.uploaded, photo];
			} else this.#confirm(entry.body, body as RunEventResult);
			this.#changed();
		},
		onrefused: async (entry: Entry, held: Entry[]) => {
			this.note =
				entry.kind === 'photo'
					? `A photo was not uploaded: ${entry.held?.message ?? held[0].held?.message}`
					: null;
			if (entry.kind === 'event') await this.refresh();
		}
	};

	/** The server stored an event: the base moves on with it (the server's state, our trail entry). */
	#confirm(body: RunEventInput, result: RunEventResult) {
		const def = this.base.flow.definition;
		const planned = planEvent(def, this.machine, this.base.snapshot, flowEventOf(body));
		if (!planned.ok) return void this.refresh();
		const now = new Date().toISOString();
		const state = result.state ?? {};
		this.base = {
			...this.base,
			...state,
			snapshot: state.snapshot ?? planned.plan.snapshot,
			stepEnteredAt: state.stepEnteredAt ?? now,
			steps: appendRecord(this.base.steps, body, planned.plan, result.seq, now)
		};
		if (state.currentStep && state.currentStep !== planned.plan.currentStep)
			this.note = 'The server holds a different step for this run; showing where it stands.';
		if (state.status === 'abandoned') this.onended('This run was abandoned on another device.');
		void this.#write((s) => s.putBase({ runId: this.runId, seq: result.seq, run: this.base }));
	}

	/** Fetches where the run stands on the server (after a refusal), keeping it for offline use. */
	async refresh() {
		try {
			const res = await fetch(`/api/runs/${this.runId}`);
			if (!res.ok) return;
			const run = (await res.json()) as RunDetail;
			this.base = run;
			await this.#write((s) => s.putBase({ runId: this.runId, seq: seqOf(run), run }));
			if (run.status === 'abandoned') this.onended('This run was abandoned on another device.');
		} catch {
			// Offline again: the held answers stay; the base is refreshed on the next refusal or reload.
		}
	}
}
