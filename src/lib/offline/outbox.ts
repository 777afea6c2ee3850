/**
 * The run screen's outbox: what the technician entered that the server has not stored yet, kept in
 * the browser (IndexedDB through ./idb-store.ts; in memory where there is none) so a dropped
 * connection or a reload loses nothing. Isomorphic and free of Svelte, so the replay rules are
 * unit-tested on their own (outbox.spec.ts). The replay itself is in ./replay.ts, loaded when
 * there is something to send.
 *
 * What it promises:
 * - Entries are sent one at a time in the order they were made (`order`), each with the key it
 *   was queued with: a step event's idempotency key, so a resend after a lost answer is stored
 *   once; a photo is stored once because the server files a repeated file as a duplicate.
 * - A lost connection or a server error (5xx) stops the pass; the entry stays and is sent again.
 * - A refusal (4xx) is never dropped: the refused event and every event queued after it (planned
 *   from a state the server does not hold) are marked held, and wait for the technician to redo or
 *   discard each. Photos are independent of the run's state: only the refused one is held.
 */
import type { RunDetail, RunEventInput } from '$lib/runs/types';

type Common = {
	/** The event's idempotency key, or the photo's own key: unique, so a second put replaces. */
	id: string;
	runId: string;
	/** Only the technician who entered it sends it (a shared tablet may change hands). */
	userId: string;
	/** Send order: when it was queued, with a counter for entries made in the same millisecond. */
	order: number;
	queuedAt: number;
	/** Set when the server refused it (or an earlier event): waits for redo or discard. */
	held?: { status: number; message: string };
};
export type EventEntry = Common & { kind: 'event'; body: RunEventInput };
export type PhotoEntry = Common & {
	kind: 'photo';
	stepId: string;
	source: 'phone' | 'microscope';
	caption: string;
	name: string;
	file: Blob;
};
export type Entry = EventEntry | PhotoEntry;

/** The last run state the server confirmed, kept so an offline reload starts from it. */
export type Base = { runId: string; seq: number; run: RunDetail };

export interface OutboxStore {
	/** A run's entries, oldest first. */
	list(runId: string): Promise<Entry[]>;
	/** Adds the entry, or replaces the one with the same id (never a second copy). */
	put(entry: Entry): Promise<void>;
	remove(id: string): Promise<void>;
	/** Every entry of every run: for the sign-out question and the age warning. */
	all(): Promise<Entry[]>;
	getBase(runId: string): Promise<Base | undefined>;
	putBase(base: Base): Promise<void>;
}

let last = 0;
/** A send order after every one handed out before in this page, even within one millisecond. */
export function nextOrder(now = Date.now()): number {
	last = Math.max(now * 1000, last + 1);
	return last;
}

/** The highest step number the run's trail holds: which of two copies of a run is newer. */
export const seqOf = (run: Pick<RunDetail, 'steps'>) => run.steps.reduce((m, s) => Math.max(m, s.seq), 0);

/** The oldest waiting entry's age in ms (held ones count: they wait too), or 0. */
export function oldestAge(entries: readonly Entry[], now = Date.now()): number {
	return entries.reduce((m, e) => Math.max(m, now - e.queuedAt), 0);
}
