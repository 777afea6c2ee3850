import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as staff from '$lib/server/staff/queries';
import * as library from '$lib/server/flows/queries';
import { POST as create } from './+server';
import { GET as read, PUT as save } from './[draftId]/+server';
import { POST as act } from './[draftId]/[action]/+server';

// The handlers called as SvelteKit calls them, against the real in-memory PGlite.
type Who = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
let author: Who, reviewer: Who, tech: Who;

function event(
	user: Who | null,
	routeId: string,
	params: Record<string, string>,
	body?: unknown,
	method = 'POST'
) {
	const url = new URL(`http://x.test${routeId}`);
	const request = new Request(url, {
		method,
		body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body)
	});
	return { locals: { user }, params, request, url, route: { id: routeId } } as never;
}

async function person(name: string, role: Who['role']): Promise<Who> {
	const email = `${name.toLowerCase()}@api.test`;
	const created = await staff.create(null, { name, email, role, password: `${name}-password-1` });
	return { id: created.id, name, email, role };
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	author = await person('Ivo', 'senior');
	reviewer = await person('Uma', 'lead');
	tech = await person('Kai', 'technician');
});

describe('draft API', () => {
	it('answers 401 without a session and 403 to a technician', async () => {
		const from = (await library.getVersion('not-charging-after-liquid', 1))!;
		await expect(
			create(event(null, '/api/flows/drafts', {}, { fromVersionId: from.id }))
		).rejects.toMatchObject({ status: 401 });
		await expect(
			create(event(tech, '/api/flows/drafts', {}, { fromVersionId: from.id }))
		).rejects.toMatchObject({ status: 403 });
	});

	it('creates, saves (409 on a stale revision), submits and approves a draft; bad input is a 400', async () => {
		const from = (await library.getVersion('not-charging-after-liquid', 1))!;
		expect((await create(event(author, '/api/flows/drafts', {}, 'not json'))).status).toBe(400);
		const created = await create(event(author, '/api/flows/drafts', {}, { fromVersionId: from.id }));
		expect(created.status).toBe(201);
		const draft = await created.json();
		expect(draft).toMatchObject({ status: 'draft', revision: 1, flowId: 'not-charging-after-liquid' });
		const at = `/api/flows/drafts/${draft.id}`;

		const edited = { ...draft.definition, summary: 'Shorter summary.' };
		const ok = await save(
			event(author, at, { draftId: draft.id }, { revision: 1, definition: edited }, 'PUT')
		);
		expect(ok.status).toBe(200);
		expect((await ok.json()).revision).toBe(2);
		const stale = await save(
			event(author, at, { draftId: draft.id }, { revision: 1, definition: draft.definition }, 'PUT')
		);
		expect(stale.status).toBe(409);
		expect(await stale.json()).toMatchObject({
			current: { revision: 2, definition: { summary: 'Shorter summary.' } }
		});
		expect((await save(event(author, at, { draftId: draft.id }, { revision: 'two' }, 'PUT'))).status).toBe(
			400
		);

		expect((await read(event(author, at, { draftId: draft.id }, undefined, 'GET'))).status).toBe(200);
		expect((await read(event(author, at, { draftId: 'not-a-uuid' }, undefined, 'GET'))).status).toBe(404);

		expect((await act(event(author, `${at}/submit`, { draftId: draft.id, action: 'submit' }))).status).toBe(
			200
		);
		const own = await act(event(author, `${at}/approve`, { draftId: draft.id, action: 'approve' }));
		expect(own.status).toBe(403);
		expect((await own.json()).message).toMatch(/another senior or a lead/);
		expect(
			(
				await act(
					event(reviewer, `${at}/send-back`, { draftId: draft.id, action: 'send-back' }, { comment: '' })
				)
			).status
		).toBe(400);
		const approved = await act(event(reviewer, `${at}/approve`, { draftId: draft.id, action: 'approve' }));
		expect(await approved.json()).toMatchObject({ status: 'published', version: 2 });
		expect(
			(await act(event(reviewer, `${at}/approve`, { draftId: draft.id, action: 'approve' }))).status
		).toBe(409);
		expect(
			(await act(event(reviewer, `${at}/publish`, { draftId: draft.id, action: 'publish' }))).status
		).toBe(404);
	});

	it('refuses to submit a draft with problems, listing them', async () => {
		const from = (await library.getVersion('not-charging-after-liquid', 2))!;
		const draft = await (
			await create(event(author, '/api/flows/drafts', {}, { fromVersionId: from.id }))
		).json();
		const broken = { ...draft.definition, start: 'no-such-step' };
		await save(event(author, '/x', { draftId: draft.id }, { revision: 1, definition: broken }, 'PUT'));
		const refused = await act(event(author, '/x', { draftId: draft.id, action: 'submit' }));
		expect(refused.status).toBe(400);
		expect((await refused.json()).problems).toContainEqual(
			expect.objectContaining({ code: 'missing-start' })
		);
	});
});
