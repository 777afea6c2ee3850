import { render, screen } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import type { Entry } from '$lib/offline/outbox';
import type { RunOutbox } from './run-outbox.svelte';
import OutboxStatus from './OutboxStatus.svelte';

const hour = 3_600_000;
function entry(kind: 'event' | 'photo', ageMs: number, held = false): Entry {
	const base = { id: `${kind}-${ageMs}`, runId: 'r', userId: 'u', order: 1, queuedAt: Date.now() - ageMs };
	const h = held ? { held: { status: 409, message: 'Moved on.' } } : {};
	return kind === 'event'
		? { ...base, ...h, kind, body: { type: 'BACK', stepId: 's', idempotencyKey: base.id } }
		: { ...base, ...h, kind, stepId: 's', source: 'phone', caption: '', name: 'p.jpg', file: new Blob() };
}
const outbox = (mine: Entry[], online = true) => ({ mine, online, failing: false }) as unknown as RunOutbox;

describe('OutboxStatus', () => {
	it('says offline and what waits, in words, photos apart', () => {
		render(OutboxStatus, {
			outbox: outbox([entry('event', 1), entry('event', 2), entry('photo', 3)], false)
		});
		expect(screen.getByTestId('connection')).toHaveTextContent('Offline');
		expect(screen.getByTestId('save-state')).toHaveTextContent('2 answers waiting to send');
		expect(screen.getByTestId('photos-waiting')).toHaveTextContent('1 photo waiting to upload');
	});

	it('puts refused entries first, and says all saved when nothing waits', () => {
		const { unmount } = render(OutboxStatus, {
			outbox: outbox([entry('event', 1, true), entry('event', 2)])
		});
		expect(screen.getByTestId('save-state')).toHaveTextContent('1 entry not saved — choose below');
		unmount();
		render(OutboxStatus, { outbox: outbox([]) });
		expect(screen.getByTestId('connection')).toHaveTextContent('Online');
		expect(screen.getByTestId('save-state')).toHaveTextContent('All saved');
	});

	it('warns when an entry has waited longer than the shop’s limit, and not before', async () => {
		const { unmount } = render(OutboxStatus, { outbox: outbox([entry('event', 23 * hour)]), warnHours: 24 });
		await new Promise((r) => setTimeout(r, 50));
		expect(screen.queryByTestId('queue-stale')).toBeNull();
		unmount();
		render(OutboxStatus, { outbox: outbox([entry('event', 25 * hour)]), warnHours: 24 });
		expect(await screen.findByTestId('queue-stale', {}, { timeout: 8000 })).toHaveTextContent(
			'more than 24 hours'
		);
	}, 20_000);
});
