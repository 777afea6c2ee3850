import { describe, expect, it } from 'vitest';
import { badIdParam, paramsHandle } from './params';
import { makeEvent } from '$lib/server/testing/events';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import * as checklists from '$lib/server/checklists/queries';

const hostile = ['-'.repeat(36), 'f'.repeat(36), 'ffffffff-ffff-ffff-ffff-fffffffffffg', '1 or 1=1', '%00'];

describe('id route parameters', () => {
	it('refuses a non-UUID [id] or [draftId] on pages and API routes; flow ids stay kebab-case', () => {
		for (const id of hostile) {
			expect(badIdParam('/api/jobs/[id]', { id })).toBe('id');
			expect(badIdParam('/(app)/jobs/[id]/checklists', { id })).toBe('id');
			expect(badIdParam('/photos/[id]/[size]', { id, size: 'thumb' })).toBe('id');
			expect(badIdParam('/(app)/flows/[id]/drafts/[draftId]', { id: 'restart-loop', draftId: id })).toBe(
				'draftId'
			);
		}
		expect(badIdParam('/(app)/flows/[id]', { id: 'restart-loop-after-liquid' })).toBeNull();
		expect(badIdParam('/api/flows/[id]/versions/[version]', { id: 'restart-loop', version: '2' })).toBeNull();
		expect(badIdParam('/api/jobs/[id]', { id: '3f2b8c1e-9a4d-4e7f-8b6a-1c2d3e4f5a6b' })).toBeNull();
	});

	it('answers 404 before the route runs: JSON on the API, the error page elsewhere', async () => {
		let ran = false;
		const resolve = async () => ((ran = true), new Response('ran'));
		const api = makeEvent(`/api/jobs/${'-'.repeat(36)}`, {
			routeId: '/api/jobs/[id]',
			params: { id: '-'.repeat(36) }
		});
		const res = await paramsHandle({ event: api, resolve });
		expect([res.status, ran]).toEqual([404, false]);
		expect(await res.json()).toEqual({ message: 'Nothing here: that id is not a valid id.' });
		const page = makeEvent(`/jobs/${'f'.repeat(36)}`, {
			routeId: '/(app)/jobs/[id]',
			params: { id: 'f'.repeat(36) }
		});
		await expect(paramsHandle({ event: page, resolve })).rejects.toMatchObject({ status: 404 });
		expect(ran).toBe(false);
	});

	it('the queries themselves treat a hex-and-dash string that is no UUID as unknown, not a database error', async () => {
		for (const id of hostile) {
			expect(await jobs.get(id)).toBeUndefined();
			expect(await runs.get(id)).toBeUndefined();
			expect(await checklists.forJob(id)).toBeUndefined();
		}
	});
});
