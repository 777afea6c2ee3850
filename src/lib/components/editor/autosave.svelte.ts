/**
 * Autosave of a draft with optimistic locking: every save names the revision it was based on; the
 * server answers with the new revision, or with a conflict carrying what the other person saved.
 * A conflict stops autosave until the author chooses: take theirs, or overwrite with theirs seen.
 */
import type { FlowDefinition } from '$lib/flows/schema';

export interface Conflict {
	revision: number;
	definition: FlowDefinition;
	by: string | null;
}

export type SaveOutcome =
	{ ok: true; revision: number } | { ok: false; conflict: Conflict } | { ok: false; message: string };

export type SaveFn = (definition: FlowDefinition, revision: number) => Promise<SaveOutcome>;

export type SaveStatus = 'saved' | 'unsaved' | 'saving' | 'conflict' | 'error';

export const AUTOSAVE_DELAY_MS = 1200;

export class Autosave {
	status = $state<SaveStatus>('saved');
	revision = $state(0);
	conflict = $state.raw<Conflict | null>(null);
	message = $state<string | null>(null);
	/** Epoch ms of the last successful save. */
	savedAt = $state<number | null>(null);
	#save: SaveFn;
	#delay: number;
	#timer: ReturnType<typeof setTimeout> | undefined;
	#pending: FlowDefinition | null = null;
	#running: Promise<void> | null = null;

	constructor(save: SaveFn, revision: number, options: { delay?: number } = {}) {
		this.#save = save;
		this.revision = revision;
		this.#delay = options.delay ?? AUTOSAVE_DELAY_MS;
	}

	/** A change to save after a quiet moment. */
	changed(definition: FlowDefinition) {
		this.#pending = definition;
		if (this.status === 'conflict') return;
		this.status = 'unsaved';
		clearTimeout(this.#timer);
		this.#timer = setTimeout(() => void this.flush(), this.#delay);
	}

	/** Saves what is pending now (also before submitting for review). */
	async flush(): Promise<boolean> {
		clearTimeout(this.#timer);
		while (this.#running) await this.#running;
		if (this.status === 'conflict') return false;
		const definition = this.#pending;
		if (!definition) return this.status === 'saved';
		this.#pending = null;
		this.status = 'saving';
		let ok = false;
		this.#running = (async () => {
			try {
				const r = await this.#save(definition, this.revision);
				if (r.ok) {
					this.revision = r.revision;
					this.savedAt = Date.now();
					this.message = null;
					this.status = this.#pending ? 'unsaved' : 'saved';
					ok = true;
				} else if ('conflict' in r) {
					this.#pending = definition;
					this.conflict = r.conflict;
					this.status = 'conflict';
				} else {
					this.#pending ??= definition;
					this.message = r.message;
					this.status = 'error';
				}
			} catch {
				this.#pending ??= definition;
				this.message = 'The draft could not be saved: no answer from the server. It will be tried again.';
				this.status = 'error';
				this.#timer = setTimeout(() => void this.flush(), this.#delay * 4);
			}
		})();
		await this.#running;
		this.#running = null;
		if (ok && this.#pending) return this.flush();
		return ok;
	}

	/** Conflict: drop my unsaved changes and continue from theirs. Returns their definition. */
	takeTheirs(): FlowDefinition | null {
		const c = this.conflict;
		if (!c) return null;
		this.revision = c.revision;
		this.conflict = null;
		this.#pending = null;
		this.status = 'saved';
		return c.definition;
	}

	/** Conflict: save mine over theirs, knowingly (based on their revision). */
	async overwrite(): Promise<boolean> {
		const c = this.conflict;
		if (!c) return false;
		this.revision = c.revision;
		this.conflict = null;
		this.status = 'unsaved';
		return this.flush();
	}

	destroy() {
		clearTimeout(this.#timer);
	}
}
