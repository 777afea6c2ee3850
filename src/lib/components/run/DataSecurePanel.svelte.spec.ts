import { fireEvent, render, screen, waitFor } from '@testing-library/svelte';
import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { createActor } from 'xstate';
import { compileFlow } from '$lib/flows/machine';
import { dataFirstFlow } from '$lib/flows/data-first-fixture';
import type { RunDetail } from '$lib/runs/types';
import DataSecurePanel from './DataSecurePanel.svelte';
import RunScreen from './RunScreen.svelte';
import { loadLazyParts } from './lazy-parts.testing';

const definition = dataFirstFlow();
const jobId = '22222222-2222-4222-8222-222222222222';
const runId = '11111111-1111-4111-8111-111111111111';

function detail(): RunDetail {
	const actor = createActor(compileFlow(definition)).start();
	return {
		id: runId,
		status: 'in-progress',
		currentStep: 'boots',
		snapshot: actor.getPersistedSnapshot() as Record<string, unknown>,
		verdictCode: null,
		dataReachable: null,
		stepEnteredAt: new Date().toISOString(),
		jobId,
		technicianId: '33333333-3333-4333-8333-333333333333',
		technicianName: 'Test Technician',
		verdictStep: null,
		abandonReason: null,
		startedAt: new Date().toISOString(),
		finishedAt: null,
		flow: { id: definition.id, versionId: 'v', version: 1, definition },
		steps: []
	};
}

type Call = { url: string; method: string; body: Record<string, unknown> };

/** Records every request; events are accepted, the data route answers `dataAnswer`. */
function stubFetch(dataAnswer: () => Response = () => new Response('{}', { status: 200 })) {
	const calls: Call[] = [];
	let seq = 0;
	vi.stubGlobal('fetch', async (url: string, init?: RequestInit) => {
		const body = init?.body ? (JSON.parse(String(init.body)) as Record<string, unknown>) : {};
		calls.push({ url: String(url), method: init?.method ?? 'GET', body });
		if (String(url).endsWith('/data')) return dataAnswer();
		if (String(url).endsWith('/events')) {
			const s = definition.steps[String(body.stepId)];
			const next =
				s && (s.kind === 'symptom' || s.kind === 'test') ? s.outcomes![Number(body.outcome)].next : 'boots';
			return new Response(
				JSON.stringify({ seq: ++seq, state: { currentStep: next, status: 'in-progress' } }),
				{
					status: 200
				}
			);
		}
		return new Response(JSON.stringify({ runs: 0, minimum: 5, verdicts: [], suggestion: null }), {
			status: 200
		});
	});
	return calls;
}

beforeAll(loadLazyParts);
afterEach(() => vi.unstubAllGlobals());

describe('DataSecurePanel', () => {
	it('asks for an outcome and a note before sending, then sends both with the run', async () => {
		const calls = stubFetch();
		const onrecorded = vi.fn();
		render(DataSecurePanel, { jobId, runId, onrecorded });
		const record = screen.getByRole('button', { name: 'Record and continue' });
		await fireEvent.click(record);
		expect(screen.getByRole('alert')).toHaveTextContent(/Choose what became of the data/);
		await fireEvent.click(screen.getByLabelText('Backed up'));
		await fireEvent.click(record);
		expect(screen.getByText(/Add a note/)).toBeInTheDocument();
		expect(calls).toEqual([]);
		await fireEvent.input(screen.getByLabelText('Note'), {
			target: { value: 'Copied to the customer’s drive' }
		});
		await fireEvent.click(record);
		await waitFor(() =>
			expect(onrecorded).toHaveBeenCalledWith('backed-up', 'Copied to the customer’s drive')
		);
		expect(calls).toEqual([
			{
				url: `/api/jobs/${jobId}/data`,
				method: 'PUT',
				body: { outcome: 'backed-up', note: 'Copied to the customer’s drive', runId }
			}
		]);
	});

	it('shows the server’s refusal and keeps what was typed', async () => {
		stubFetch(() => new Response(JSON.stringify({ message: 'No job with this id.' }), { status: 404 }));
		const onrecorded = vi.fn();
		render(DataSecurePanel, { jobId, runId, onrecorded });
		await fireEvent.click(screen.getByLabelText('Not possible'));
		await fireEvent.input(screen.getByLabelText('Note'), { target: { value: 'Locks up during the copy' } });
		await fireEvent.click(screen.getByRole('button', { name: 'Record and continue' }));
		await waitFor(() =>
			expect(screen.getByRole('alert')).toHaveTextContent('Not recorded: No job with this id.')
		);
		expect(onrecorded).not.toHaveBeenCalled();
		expect(screen.getByLabelText('Note')).toHaveValue('Locks up during the copy');
		expect(screen.getByLabelText('Not possible')).toBeChecked();
	});
});

describe('RunScreen on a data-first job', () => {
	it('asks once the data is reachable, holds the hot-air step until the outcome is recorded, then goes on', async () => {
		const calls = stubFetch();
		render(RunScreen, { run: detail(), onresync: vi.fn(), job: { dataFirst: true, dataOutcome: null } });
		expect(screen.queryByTestId('data-secure')).toBeNull();
		await fireEvent.click(screen.getByRole('button', { name: /Boots to the lock screen/ }));
		await screen.findByRole('heading', { name: 'Secure the customer’s data' });

		await fireEvent.click(screen.getByRole('button', { name: /Corrosion under a part/ }));
		expect(screen.getByTestId('data-held')).toHaveTextContent(/before “Lift the corroded part with hot air”/);
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent(
			'Inspect the board under the microscope'
		);

		await fireEvent.click(screen.getByLabelText('Backed up'));
		await fireEvent.input(screen.getByLabelText('Note'), { target: { value: 'Shop backup disk' } });
		await fireEvent.click(screen.getByRole('button', { name: 'Record and continue' }));
		await waitFor(() => expect(screen.queryByTestId('data-secure')).toBeNull());
		expect(screen.getByTestId('data-secured')).toHaveTextContent('backed up');

		await fireEvent.click(screen.getByRole('button', { name: /Corrosion under a part/ }));
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent(
			'Lift the corroded part with hot air'
		);
		await waitFor(() =>
			expect(calls.filter((c) => c.url.endsWith('/events')).map((c) => c.body.stepId)).toEqual([
				'boots',
				'inspect'
			])
		);
	});

	it('asks at once when the answer that proves the data reachable leads straight into a hot-air step', async () => {
		const calls = stubFetch();
		render(RunScreen, { run: detail(), onresync: vi.fn(), job: { dataFirst: true, dataOutcome: null } });
		await fireEvent.click(screen.getByRole('button', { name: /Readable, but the board needs work/ }));
		expect(screen.getByTestId('data-secure')).toBeInTheDocument();
		expect(screen.getByTestId('data-held')).toHaveTextContent(/“Lift the corroded part with hot air”/);
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent('Does the phone start?');
		expect(calls.filter((c) => c.url.endsWith('/events'))).toEqual([]);
	});

	it('asks from the start when another run of the job reached the data', async () => {
		const calls = stubFetch();
		render(RunScreen, {
			run: detail(),
			onresync: vi.fn(),
			job: { dataFirst: true, dataOutcome: null, dataReachedBefore: true }
		});
		expect(screen.getByTestId('data-secure')).toBeInTheDocument();
		await fireEvent.click(screen.getByRole('button', { name: /Stays dark/ }));
		await fireEvent.click(screen.getByRole('button', { name: /Corrosion under a part/ }));
		expect(screen.getByTestId('data-held')).toBeInTheDocument();
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent(
			'Inspect the board under the microscope'
		);
		await waitFor(() => expect(calls.filter((c) => c.url.endsWith('/events'))).toHaveLength(1));
	});

	it('never asks on a job that is not data-first', async () => {
		const calls = stubFetch();
		render(RunScreen, { run: detail(), onresync: vi.fn(), job: { dataFirst: false, dataOutcome: null } });
		await fireEvent.click(screen.getByRole('button', { name: /Boots to the lock screen/ }));
		await fireEvent.click(screen.getByRole('button', { name: /Corrosion under a part/ }));
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent(
			'Lift the corroded part with hot air'
		);
		expect(screen.queryByTestId('data-secure')).toBeNull();
		await waitFor(() => expect(calls.filter((c) => c.url.endsWith('/events'))).toHaveLength(2));
	});
});
