/**
 * The editor's background layout: one worker per editor, created on first use, answering each
 * request by id. Without worker support (old browsers, tests) it answers with a rejection and the
 * layouter keeps its patched positions.
 */
import { fromMessage, type Placement, type PlacementMessage } from '$lib/flows/layout';
import type { FlowDefinition } from '$lib/flows/schema';

type Answer = { id: number; placement?: PlacementMessage; error?: string };

export function createPlacer() {
	let worker: Worker | null = null;
	let next = 0;
	type Request = {
		id: number;
		definition: FlowDefinition;
		resolve: (p: Placement) => void;
		reject: (e: Error) => void;
	};
	// One request in the worker at a time and at most one waiting: a newer structure replaces the
	// waiting one, so quick edits never queue up seconds of stale layouts.
	let running: Request | null = null;
	let waiting: Request | null = null;

	function send(r: Request) {
		running = r;
		worker!.postMessage({ id: r.id, definition: r.definition });
	}

	function start(): Worker {
		const w = new Worker(new URL('./layout.worker.ts', import.meta.url), { type: 'module' });
		w.onmessage = (e: MessageEvent<Answer>) => {
			const r = running;
			if (!r || r.id !== e.data.id) return;
			running = null;
			if (e.data.placement) r.resolve(fromMessage(e.data.placement));
			else r.reject(new Error(e.data.error ?? 'layout failed'));
			if (waiting) {
				const w2 = waiting;
				waiting = null;
				send(w2);
			}
		};
		w.onerror = () => {
			running?.reject(new Error('the layout worker stopped'));
			waiting?.reject(new Error('the layout worker stopped'));
			running = waiting = null;
		};
		return w;
	}

	return {
		place(definition: FlowDefinition): Promise<Placement> {
			if (typeof Worker === 'undefined') return Promise.reject(new Error('no web workers here'));
			worker ??= start();
			return new Promise((resolve, reject) => {
				const r = { id: ++next, definition, resolve, reject };
				if (!running) send(r);
				else {
					waiting?.reject(new Error('superseded'));
					waiting = r;
				}
			});
		},
		destroy() {
			worker?.terminate();
			worker = null;
			running?.reject(new Error('closed'));
			waiting?.reject(new Error('closed'));
			running = waiting = null;
		}
	};
}
