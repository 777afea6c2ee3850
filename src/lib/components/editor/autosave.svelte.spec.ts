import { describe, expect, it, vi } from 'vitest';
import { setFlowField } from '$lib/flows/edit';
import { Autosave, type SaveFn } from './autosave.svelte';
import { tinyFlow } from '$lib/flows/fixture';

/** A fake server holding one draft with a revision, as the lifecycle queries do (409 on a stale one). */
function server() {
	const state = { definition: tinyFlow(), revision: 3 };
	const save: SaveFn = vi.fn(async (definition, revision) => {
		if (revision !== state.revision)
			return {
				ok: false as const,
				conflict: { revision: state.revision, definition: state.definition, by: 'Ines' }
			};
		state.definition = definition;
		state.revision++;
		return { ok: true as const, revision: state.revision };
	});
	return { state, save };
}

describe('Autosave', () => {
	it('saves after a quiet moment, once for a burst of changes, and follows the revision', async () => {
		vi.useFakeTimers();
		const { state, save } = server();
		const a = new Autosave(save, 3, { delay: 100 });
		a.changed(setFlowField(tinyFlow(), 'title', 'T'));
		a.changed(setFlowField(tinyFlow(), 'title', 'Ti'));
		expect(a.status).toBe('unsaved');
		await vi.advanceTimersByTimeAsync(150);
		expect(save).toHaveBeenCalledOnce();
		expect(state.definition.title).toBe('Ti');
		expect(a).toMatchObject({ status: 'saved', revision: 4 });
		vi.useRealTimers();
	});

	it('stops on a conflict and never overwrites silently; the author chooses', async () => {
		const { state, save } = server();
		const a = new Autosave(save, 3, { delay: 0 });
		// Someone else saves first.
		state.definition = setFlowField(tinyFlow(), 'title', 'Theirs');
		state.revision = 4;
		a.changed(setFlowField(tinyFlow(), 'title', 'Mine'));
		expect(await a.flush()).toBe(false);
		expect(a.status).toBe('conflict');
		expect(a.conflict).toMatchObject({ revision: 4, by: 'Ines' });
		expect(state.definition.title).toBe('Theirs');
		// More typing while in conflict is kept but not sent.
		a.changed(setFlowField(tinyFlow(), 'title', 'Mine, more'));
		expect(await a.flush()).toBe(false);
		expect(state.definition.title).toBe('Theirs');
		// Overwrite knowingly: saved on top of their revision.
		expect(await a.overwrite()).toBe(true);
		expect(state.definition.title).toBe('Mine, more');
		expect(a).toMatchObject({ status: 'saved', revision: 5, conflict: null });
	});

	it('reloads theirs and drops the unsaved changes', async () => {
		const { state, save } = server();
		const a = new Autosave(save, 2, { delay: 0 });
		a.changed(setFlowField(tinyFlow(), 'title', 'Mine'));
		await a.flush();
		const theirs = a.takeTheirs();
		expect(theirs?.title).toBe(state.definition.title);
		expect(a).toMatchObject({ status: 'saved', revision: 3 });
		expect(await a.flush()).toBe(true);
		expect(save).toHaveBeenCalledOnce();
	});

	it('keeps the change and says so when the server cannot be reached', async () => {
		const save: SaveFn = vi
			.fn()
			.mockRejectedValueOnce(new TypeError('fetch failed'))
			.mockResolvedValue({ ok: true, revision: 2 });
		const a = new Autosave(save, 1, { delay: 0 });
		a.changed(tinyFlow());
		expect(await a.flush()).toBe(false);
		expect(a.status).toBe('error');
		expect(a.message).toContain('could not be saved');
		expect(await a.flush()).toBe(true);
		expect(a.revision).toBe(2);
		a.destroy();
	});
});
