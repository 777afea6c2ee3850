import { describe, expect, it } from 'vitest';
import { collapseSaves, type HistoryEntry } from './history';

let n = 0;
const entry = (action: string, actorName: string, details: Record<string, unknown> = {}): HistoryEntry => ({
	id: ++n,
	action,
	actorName,
	at: new Date(Date.UTC(2026, 0, 1, 12, 0, n)),
	details
});

describe('collapseSaves', () => {
	it('folds a run of saves by one person on one draft into one line with the count', () => {
		const list = [
			entry('flow.submit', 'Ana', { draftId: 'd1' }),
			entry('flow.draft.save', 'Ana', { draftId: 'd1', revision: 4 }),
			entry('flow.draft.save', 'Ana', { draftId: 'd1', revision: 3 }),
			entry('flow.draft.save', 'Ana', { draftId: 'd1', revision: 2 }),
			entry('flow.draft.save', 'Ben', { draftId: 'd1', revision: 1 }),
			entry('flow.draft.save', 'Ben', { draftId: 'd2', revision: 5 }),
			entry('flow.draft.create', 'Ana', { draftId: 'd1' })
		];
		const out = collapseSaves(list);
		expect(out.map((e) => [e.action, e.actorName, e.details.times ?? 1])).toEqual([
			['flow.submit', 'Ana', 1],
			['flow.draft.save', 'Ana', 3],
			['flow.draft.save', 'Ben', 1],
			['flow.draft.save', 'Ben', 1],
			['flow.draft.create', 'Ana', 1]
		]);
		// The newest save of the run stays the line's time and id.
		expect(out[1].id).toBe(list[1].id);
	});

	it('leaves a list without saves as it is', () => {
		const list = [entry('flow.publish', 'Ben', { version: 2 }), entry('flow.approve', 'Ben')];
		expect(collapseSaves(list)).toEqual(list);
	});
});
