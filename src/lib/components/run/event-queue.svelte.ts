import type { RunEventInput, RunEventResult } from '$lib/runs/types';

/** What the queue tells the run screen. */
export type QueueHooks<T> = {
	/** The server stored the event (or had stored it already: a repeated key answers the same). */
	onsaved: (body: RunEventInput, extra: T, result: RunEventResult) => void;
	/** The step the screen stands on, to notice a server that holds another one. */
	current: () => string;
	/** The screen must reload the run from the server, showing `message`. */
	onresync: (message: string) => void;
};

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * The run screen's outbox: events go to the server one at a time, in order; a lost connection or a
 * 5xx retries the same body with the same idempotency key, backing off up to 8 s, so the server
 * applies each event once however often it arrives. A 4xx empties the queue and asks the screen to
 * resync, since everything after a refused event was planned from a state the server does not hold.
 * `extra` rides along with each event for the screen's own bookkeeping.
 */
export class EventQueue<T> {
	/** Events not yet stored by the server. */
	pending = $state(0);
	/** The last attempt failed for want of a connection (or a server error); retrying. */
	retrying = $state(false);
	#queue: { body: RunEventInput; extra: T }[] = [];
	#pumping = false;
	readonly runId: string;
	readonly hooks: QueueHooks<T>;

	constructor(runId: string, hooks: QueueHooks<T>) {
		this.runId = runId;
		this.hooks = hooks;
	}

	push(body: RunEventInput, extra: T) {
		this.#queue.push({ body, extra });
		this.pending = this.#queue.length;
		void this.#pump();
	}

	async #pump() {
		if (this.#pumping) return;
		this.#pumping = true;
		let attempt = 0;
		while (this.#queue.length) {
			const { body, extra } = this.#queue[0];
			let res: Response | undefined;
			try {
				res = await fetch(`/api/runs/${this.runId}/events`, {
					method: 'POST',
					headers: { 'content-type': 'application/json' },
					body: JSON.stringify(body)
				});
			} catch {
				res = undefined;
			}
			if (!res || res.status >= 500) {
				this.retrying = true;
				await sleep(Math.min(8000, 500 * 2 ** attempt++));
				continue;
			}
			attempt = 0;
			this.retrying = false;
			if (res.ok) {
				const result = (await res.json()) as RunEventResult;
				this.#queue.shift();
				this.pending = this.#queue.length;
				this.hooks.onsaved(body, extra, result);
				if (!this.#queue.length && result.state.currentStep !== this.hooks.current()) {
					this.#pumping = false;
					this.hooks.onresync('The server holds a different step for this run; showing where it stands.');
					return;
				}
				continue;
			}
			const err = (await res.json().catch(() => ({}))) as { message?: string };
			this.#queue = [];
			this.pending = 0;
			this.#pumping = false;
			this.hooks.onresync(
				res.status === 409
					? `${err.message ?? 'This run has moved on.'} Showing where it stands now.`
					: `Not saved: ${err.message ?? res.statusText}`
			);
			return;
		}
		this.#pumping = false;
	}
}
