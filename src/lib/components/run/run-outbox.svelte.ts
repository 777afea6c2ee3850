import { compileFlow } from '$lib/flows/machine';
import type { RunDetail, RunEventInput } from '$lib/runs/types';
import type { PhotoDto } from '$lib/photos/limits';
import { nextOrder, type Entry } from '$lib/offline/outbox';
import type { OutboxEngine } from './outbox-engine';
import { newKey } from './keys';

/**
 * The run screen's side of the outbox (src/lib/offline/outbox.ts): it holds the confirmed run (the
 * base) and this run's waiting entries as reactive state. The work behind it — IndexedDB, sending
 * in order, telling the other tabs — is in ./outbox-engine.ts, loaded once the screen is up, so
 * the page's first JavaScript stays small (bench/runs). Pushing an entry changes the screen at once.
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
	/** Entries pushed but not yet written: a list read from the store meanwhile must keep them. */
	// Bookkeeping only (nothing renders from it): a plain Set, not a reactive one.
	// eslint-disable-next-line svelte/prefer-svelte-reactivity
	readonly unwritten = new Set<string>();

	readonly runId: string;
	readonly userId: string;
	readonly machine;
	readonly onended: (message: string) => void;
	#engine: Promise<OutboxEngine> | undefined;

	constructor(run: RunDetail, userId: string, onended: (message: string) => void) {
		this.onended = onended;
		this.base = run;
		this.runId = run.id;
		this.userId = userId;
		this.machine = compileFlow(run.flow.definition);
	}

	get engine() {
		return (this.#engine ??= import('./outbox-engine').then((m) => new m.OutboxEngine(this)));
	}

	get mine() {
		return this.entries.filter((e) => e.userId === this.userId);
	}

	/** Reads what this device holds for the run, starts listening, and sends what waits. */
	start() {
		let stop: (() => void) | undefined;
		let stopped = false;
		void this.engine.then((e) => {
			if (!stopped) stop = e.start();
		});
		return () => {
			stopped = true;
			stop?.();
		};
	}

	#push(entry: Entry) {
		this.unwritten.add(entry.id);
		this.entries = [...this.entries, entry];
		return this.engine.then((e) => e.persist(entry));
	}

	/** Queues a step event the screen has already planned; the screen moves on at once. */
	pushEvent(body: RunEventInput) {
		void this.#push({
			kind: 'event',
			id: body.idempotencyKey,
			runId: this.runId,
			userId: this.userId,
			order: nextOrder(),
			queuedAt: Date.now(),
			body
		});
	}

	/** Queues a photo (already checked against the size limit); false if this device could not keep it. */
	pushPhoto(file: File, fields: { stepId: string; source: 'phone' | 'microscope'; caption: string }) {
		return this.#push({
			kind: 'photo',
			id: newKey(),
			runId: this.runId,
			userId: this.userId,
			order: nextOrder(),
			queuedAt: Date.now(),
			name: file.name || 'photo',
			file,
			...fields
		});
	}

	/** A held entry goes back in the queue, as the newest, with a fresh key. */
	redo(entry: Entry) {
		void this.engine.then((e) => e.redo(entry));
	}

	discard(entry: Entry) {
		this.entries = this.entries.filter((e) => e.id !== entry.id);
		void this.engine.then((e) => e.discard(entry));
	}
}
