import { fireEvent, render, screen, waitFor } from '@testing-library/svelte';
import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { createActor } from 'xstate';
import { compileFlow } from '$lib/flows/machine';
import type { FlowDefinition } from '$lib/flows/schema';
import type { RunDetail } from '$lib/runs/types';
import RunScreen from './RunScreen.svelte';
import { loadLazyParts } from './lazy-parts.testing';

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

beforeAll(loadLazyParts);
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

// Generous: the photo and history sections load as separate chunks, slow on a busy machine.
describe('RunScreen', { timeout: 20_000 }, () => {
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
		await waitFor(() => expect(screen.getByTestId('save-state')).toHaveTextContent('All saved'));
		expect(screen.getByRole('navigation', { name: 'Path so far' })).toHaveTextContent(
			'Look at the phone: Restarts › Check the flex'
		);
	});

	it('retries a lost connection with the same key and says what waits to be sent', async () => {
		vi.useFakeTimers({ toFake: ['setTimeout'] });
		const fetchMock = vi
			.fn()
			.mockRejectedValueOnce(new TypeError('Failed to fetch'))
			.mockResolvedValueOnce(ok(1, 'check'));
		stubFetch(fetchMock);
		render(RunScreen, { run: detail(), onresync: vi.fn() });
		await fireEvent.keyDown(window, { key: '1' });
		await waitFor(() =>
			expect(screen.getByTestId('save-state')).toHaveTextContent('1 answer waiting to send')
		);
		expect(screen.getByTestId('connection')).toHaveTextContent('Offline');
		await vi.advanceTimersByTimeAsync(600);
		vi.useRealTimers();
		await waitFor(() => expect(fetchMock).toHaveBeenCalledTimes(2));
		const keys = fetchMock.mock.calls.map((c) => JSON.parse(c[1].body).idempotencyKey);
		expect(keys[0]).toBe(keys[1]);
		await waitFor(() => expect(screen.getByTestId('save-state')).toHaveTextContent('All saved'));
	});

	it('on a 409 shows where the server stands and offers to redo or discard the refused answer', async () => {
		const server = { ...detail(), currentStep: 'check' };
		// The server's run moved on to "check" from another device.
		server.snapshot = createActor(compileFlow(definition), {
			snapshot: server.snapshot as never
		})
			.start()
			.getPersistedSnapshot() as Record<string, unknown>;
		const moved = createActor(compileFlow(definition), { snapshot: server.snapshot as never }).start();
		moved.send({ type: 'ANSWER', outcome: 0 });
		server.snapshot = moved.getPersistedSnapshot() as Record<string, unknown>;
		server.steps = [
			{
				seq: 1,
				stepId: 'look',
				kind: 'symptom',
				answer: { outcome: { index: 0, label: 'Restarts' } },
				notes: '',
				enteredAt: server.startedAt,
				answeredAt: server.startedAt,
				supersededAt: null
			}
		];
		vi.stubGlobal('fetch', (url: string) =>
			Promise.resolve(
				String(url).endsWith('/events')
					? new Response(JSON.stringify({ message: 'This run has moved on.' }), { status: 409 })
					: String(url).includes('/history')
						? new Response(JSON.stringify(noHistory), { status: 200 })
						: new Response(JSON.stringify(server), { status: 200 })
			)
		);
		render(RunScreen, { run: detail(), onresync: vi.fn() });
		await fireEvent.keyDown(window, { key: '2' });
		// The local machine reached the verdict at once …
		expect(screen.getByText('Severity: No fault found')).toBeInTheDocument();
		// … the server's refusal brings its state back, and the answer is kept for a decision.
		const held = await screen.findByTestId('held-entry', {}, { timeout: 8000 });
		expect(held).toHaveTextContent('Answer “Fine”');
		expect(held).toHaveTextContent('This run has moved on.');
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent('Check the flex');
		expect(screen.getByTestId('save-state')).toHaveTextContent('1 entry not saved');
		// It was answered at "look"; the run stands on "check": it cannot be redone there.
		expect(screen.getByRole('button', { name: 'Redo' })).toBeDisabled();
		await fireEvent.click(screen.getByRole('button', { name: 'Discard' }));
		await waitFor(() => expect(screen.queryByTestId('held-entry')).toBeNull());
		expect(screen.getByTestId('save-state')).toHaveTextContent('All saved');
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
		expect(await screen.findByTestId('photo-camera-input', {}, { timeout: 8000 })).toHaveAttribute(
			'capture',
			'environment'
		);
		const past = await screen.findByTestId('past-runs');
		expect(past).toHaveTextContent('History, not advice');
		expect(past).toHaveTextContent('No fault found');
		expect(past).toHaveTextContent('9/12');
	});
});
