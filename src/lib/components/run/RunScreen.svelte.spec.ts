import { fireEvent, render, screen, waitFor } from '@testing-library/svelte';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { createActor } from 'xstate';
import { compileFlow } from '$lib/flows/machine';
import type { FlowDefinition } from '$lib/flows/schema';
import type { RunDetail } from '$lib/runs/types';
import RunScreen from './RunScreen.svelte';

// A three-step flow written for this test.
const definition: FlowDefinition = {
	id: 'test-flow',
	title: 'Test flow',
	summary: 'For the run screen test.',
	symptoms: ['restart-loop'],
	start: 'look',
	steps: {
		look: {
			kind: 'symptom',
			title: 'Look at the phone',
			minutes: 1,
			outcomes: [
				{ label: 'Restarts', next: 'check' },
				{ label: 'Fine', next: 'fine', records: 'data-reachable' }
			]
		},
		check: { kind: 'test', title: 'Check the flex', minutes: 2, outcomes: [{ label: 'Done', next: 'fine' }] },
		fine: {
			kind: 'verdict',
			title: 'Nothing wrong',
			verdict: { code: 'fine', severity: 'no-fault', repair: '- [ ] Tell the customer', risks: 'None known.' }
		}
	}
};

function detail(): RunDetail {
	const actor = createActor(compileFlow(definition)).start();
	return {
		id: '11111111-1111-4111-8111-111111111111',
		status: 'in-progress',
		currentStep: 'look',
		snapshot: actor.getPersistedSnapshot() as Record<string, unknown>,
		verdictCode: null,
		dataReachable: null,
		stepEnteredAt: new Date().toISOString(),
		jobId: '22222222-2222-4222-8222-222222222222',
		technicianId: '33333333-3333-4333-8333-333333333333',
		technicianName: 'Test Technician',
		verdictStep: null,
		abandonReason: null,
		startedAt: new Date().toISOString(),
		finishedAt: null,
		flow: { id: 'test-flow', versionId: 'v', version: 1, definition },
		steps: []
	};
}

const ok = (seq: number, currentStep: string) =>
	new Response(JSON.stringify({ seq, state: { currentStep, status: 'in-progress' } }), { status: 200 });

afterEach(() => vi.unstubAllGlobals());

const noHistory = { flowId: 'f', stepId: 'look', runs: 2, minimum: 5, verdicts: [], suggestion: null };

/** Events go to `events`; the past-runs panel's history requests get `history`. */
function stubFetch(
	events: (url: string, init?: RequestInit) => Promise<Response>,
	history: object = noHistory
) {
	vi.stubGlobal('fetch', (url: string, init?: RequestInit) =>
		String(url).endsWith('/events')
			? events(url, init)
			: Promise.resolve(new Response(JSON.stringify(history), { status: 200 }))
	);
}

describe('RunScreen', () => {
	it('moves on at once and posts the event with a fresh idempotency key', async () => {
		const fetchMock = vi.fn().mockResolvedValue(ok(1, 'check'));
		stubFetch(fetchMock);
		render(RunScreen, { run: detail(), onresync: vi.fn() });
		await fireEvent.keyDown(window, { key: '1' });
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent('Check the flex');
		await waitFor(() => expect(fetchMock).toHaveBeenCalledOnce());
		const [url, init] = fetchMock.mock.calls[0];
		expect(url).toBe('/api/runs/11111111-1111-4111-8111-111111111111/events');
		const body = JSON.parse(init.body);
		expect(body).toMatchObject({ type: 'ANSWER', stepId: 'look', outcome: 0 });
		expect(body.idempotencyKey).toMatch(/^[0-9a-f-]{36}$/);
		await waitFor(() => expect(screen.getByTestId('save-state')).toHaveTextContent('Saved'));
		expect(screen.getByRole('navigation', { name: 'Path so far' })).toHaveTextContent(
			'Look at the phone: Restarts › Check the flex'
		);
	});

	it('retries a lost connection with the same key and says that it is saving', async () => {
		vi.useFakeTimers({ toFake: ['setTimeout'] });
		const fetchMock = vi
			.fn()
			.mockRejectedValueOnce(new TypeError('Failed to fetch'))
			.mockResolvedValueOnce(ok(1, 'check'));
		stubFetch(fetchMock);
		render(RunScreen, { run: detail(), onresync: vi.fn() });
		await fireEvent.keyDown(window, { key: '1' });
		await waitFor(() =>
			expect(screen.getByTestId('save-state')).toHaveTextContent(/connection lost, retrying/)
		);
		await vi.advanceTimersByTimeAsync(600);
		vi.useRealTimers();
		await waitFor(() => expect(fetchMock).toHaveBeenCalledTimes(2));
		const keys = fetchMock.mock.calls.map((c) => JSON.parse(c[1].body).idempotencyKey);
		expect(keys[0]).toBe(keys[1]);
		await waitFor(() => expect(screen.getByTestId('save-state')).toHaveTextContent('Saved'));
	});

	it('reloads the server state on a 409', async () => {
		const onresync = vi.fn();
		stubFetch(
			vi
				.fn()
				.mockResolvedValue(
					new Response(JSON.stringify({ message: 'This run has moved on.' }), { status: 409 })
				)
		);
		render(RunScreen, { run: detail(), onresync });
		await fireEvent.keyDown(window, { key: '2' });
		// The local machine reached the verdict at once …
		expect(screen.getByText('Severity: No fault found')).toBeInTheDocument();
		// … and the server's refusal brings the server state back.
		await waitFor(() =>
			expect(onresync).toHaveBeenCalledWith('This run has moved on. Showing where it stands now.')
		);
	});

	it('shows the photos of the step with an upload, and past runs from this step once there are five', async () => {
		stubFetch(vi.fn().mockResolvedValue(ok(1, 'check')), {
			...noHistory,
			runs: 12,
			verdicts: [
				{ verdictCode: 'ok', verdictTitle: 'No fault found', count: 9, share: 0.75, lower: 0.47, upper: 0.91 }
			]
		});
		render(RunScreen, {
			run: detail(),
			user: { id: '22222222-2222-4222-8222-222222222222', role: 'technician' },
			photos: [],
			onresync: vi.fn()
		});
		expect(await screen.findByRole('heading', { name: 'Photos of this step' })).toBeInTheDocument();
		expect(await screen.findByTestId('photo-camera-input')).toHaveAttribute('capture', 'environment');
		const past = await screen.findByTestId('past-runs');
		expect(past).toHaveTextContent('History, not advice');
		expect(past).toHaveTextContent('No fault found');
		expect(past).toHaveTextContent('9/12');
	});
});
