import { beforeAll, describe, expect, it, vi } from 'vitest';
import { person, type TestPerson } from '$lib/server/staff/fixtures';
import * as library from '$lib/server/flows/queries';
import { actions, load } from './+page.server';

// Real in-memory PGlite with the shipped flows imported as at start-up.
const FLOW = 'no-sound-after-liquid';
let senior: TestPerson, tech: TestPerson;

function event(user: TestPerson, query = '', method = 'GET') {
	const url = new URL(`http://shop.test/flows/${FLOW}/drafts/new${query}`);
	const request = new Request(url, method === 'POST' ? { method, body: new FormData() } : {});
	const route = { id: '/(app)/flows/[id]/drafts/new' };
	// eslint-disable-next-line @typescript-eslint/no-explicit-any
	return { url, request, params: { id: FLOW }, locals: { user }, route } as any;
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	senior = await person('Sela', 'senior', 'new.test');
	tech = await person('Timo', 'technician', 'new.test');
});

describe('start a draft', () => {
	it('refuses technicians with 403', async () => {
		await expect(load(event(tech))).rejects.toMatchObject({ status: 403 });
		await expect(
			(actions.default as (e: unknown) => Promise<unknown>)(event(tech, '', 'POST'))
		).rejects.toMatchObject({
			status: 403
		});
	});

	it('creates a draft from the newest version and opens it in the editor', async () => {
		const current = (await library.currentPublished(FLOW))!;
		expect(await load(event(senior))).toMatchObject({ version: current.version, drafts: [] });
		const redirect = await (actions.default as (e: unknown) => Promise<unknown>)(
			event(senior, '', 'POST')
		).catch((r: unknown) => r);
		expect(redirect).toMatchObject({
			status: 303,
			location: expect.stringMatching(`^/flows/${FLOW}/drafts/[0-9a-f-]{36}$`)
		});
		const drafts = await library.openDrafts(FLOW);
		expect(drafts).toHaveLength(1);
		const draft = (await library.getVersionById(drafts[0].id))!;
		expect(draft).toMatchObject({ status: 'draft', basedOnId: current.id, checksum: current.checksum });
	});

	it('answers 400 for a bad ?from and 404 for a version that does not exist', async () => {
		await expect(load(event(senior, '?from=x'))).rejects.toMatchObject({ status: 400 });
		await expect(load(event(senior, '?from=99'))).rejects.toMatchObject({ status: 404 });
	});

	it('carries ?step= (from flow health) to the new draft, so the editor opens at that step', async () => {
		const current = (await library.currentPublished(FLOW))!;
		const step = Object.keys(current.definition.steps)[1];
		const q = `?from=${current.version}&step=${step}`;
		expect(await load(event(senior, q))).toMatchObject({ stepQuery: `?step=${step}` });
		// A step the version does not have is dropped, not passed on.
		expect(await load(event(senior, '?step=no-such-step'))).toMatchObject({ stepQuery: '' });
		const redirect = await (actions.default as (e: unknown) => Promise<unknown>)(
			event(senior, q, 'POST')
		).catch((r: unknown) => r);
		expect(redirect).toMatchObject({
			status: 303,
			location: expect.stringMatching(`^/flows/${FLOW}/drafts/[0-9a-f-]{36}\\?step=${step}$`)
		});
	});
});
