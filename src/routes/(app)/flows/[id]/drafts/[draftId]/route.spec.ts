import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as staff from '$lib/server/staff/queries';
import * as library from '$lib/server/flows/queries';
import * as authoring from '$lib/server/flows/authoring';
import { setExit, setFlowField } from '$lib/flows/edit';
import type { FlowDefinition } from '$lib/flows/schema';
import { actions, load as pageLoad } from './+page.server';
import { PUT } from './+server';

// Real in-memory PGlite (DATA_DIR=memory://): the shipped flows imported as at start-up, the
// handlers called with a minimal RequestEvent.
const FLOW = 'face-unlock-after-liquid';
type User = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
let ana: User, ben: User, tom: User;
let draftId: string;
let base: FlowDefinition;

async function person(name: string, role: User['role']): Promise<User> {
	const email = `${name.toLowerCase()}@editor.test`;
	const created = await staff.create(null, { name, email, role, password: `${name}-password-1` });
	return { id: created.id, name, email, role };
}

function event(user: User, init: RequestInit = {}, query = '') {
	const path = `/flows/${FLOW}/drafts/${draftId}${query}`;
	const url = new URL(`http://shop.test${path}`);
	return {
		url,
		request: new Request(url, init),
		params: { id: FLOW, draftId },
		locals: { user },
		route: { id: '/(app)/flows/[id]/drafts/[draftId]' },
		cookies: { get: () => undefined }
		// eslint-disable-next-line @typescript-eslint/no-explicit-any
	} as any;
}

const put = (user: User, body: unknown) =>
	PUT(
		event(user, {
			method: 'PUT',
			headers: { 'content-type': 'application/json' },
			body: JSON.stringify(body)
		})
	);
type Data = Exclude<Awaited<ReturnType<typeof pageLoad>>, void>;
const load = async (user: User) => (await pageLoad(event(user))) as Data;

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	ana = await person('Ana', 'senior');
	ben = await person('Ben', 'senior');
	tom = await person('Tom', 'technician');
	const published = (await library.currentPublished(FLOW))!;
	base = published.definition;
	draftId = (await authoring.createDraft({ id: ana.id, role: 'senior' }, { fromVersionId: published.id })).id;
});

describe('editor route', () => {
	it('loads the draft for a senior and refuses a technician with 403', async () => {
		const data = await load(ana);
		expect(data.draft).toMatchObject({ id: draftId, status: 'draft', revision: 1 });
		expect(Object.keys(data.definition.steps)).toEqual(Object.keys(base.steps));
		await expect(load(tom)).rejects.toMatchObject({ status: 403 });
		await expect(put(tom, { revision: 1, definition: base })).rejects.toMatchObject({ status: 403 });
	});

	it('opens at the step named by ?step= (flow health links here), ignoring an unknown one', async () => {
		const second = Object.keys(base.steps)[1];
		const at = async (q: string) => ((await pageLoad(event(ana, {}, q))) as Data).step;
		expect(await at(`?step=${second}`)).toBe(second);
		expect(await at('?step=no-such-step')).toBeNull();
		expect(await at('')).toBeNull();
	});

	it('autosaves with the revision and answers 409 with the other save when two people edit', async () => {
		const mine = setFlowField(base, 'title', 'Face unlock or front camera gone after liquid');
		const first = await put(ana, { revision: 1, definition: mine });
		expect(first.status).toBe(200);
		expect(await first.json()).toEqual({ revision: 2 });

		// Ben opened the draft at revision 1 too: his save is refused, nothing is overwritten.
		const theirs = setFlowField(base, 'title', 'Something else');
		const stale = await put(ben, { revision: 1, definition: theirs });
		expect(stale.status).toBe(409);
		const body = await stale.json();
		expect(body.current).toMatchObject({ revision: 2, definition: { title: mine.title } });
		expect(body.message).toMatch(/saved this draft/);
		expect((await load(ana)).definition.title).toBe(mine.title);
	});

	it('refuses bad input with 400 and a reason, never 500', async () => {
		const notJson = await PUT(event(ana, { method: 'PUT', body: '{nope' }));
		expect(notJson.status).toBe(400);
		const noRevision = await put(ana, { definition: base });
		expect(noRevision.status).toBe(400);
		expect((await noRevision.json()).issues[0].path).toEqual(['revision']);
		const otherId = await put(ana, { revision: 2, definition: { ...base, id: 'another-flow' } });
		expect(otherId.status).toBe(400);
	});

	it('refuses to submit a draft with problems, then submits it once fixed', async () => {
		const first = Object.keys(base.steps)[0];
		const broken = setExit(base, first, 0, { next: 'nowhere' });
		if (!broken.ok) throw new Error(broken.message);
		expect((await put(ana, { revision: 2, definition: broken.definition })).status).toBe(200);
		const submit = actions.submit as (e: unknown) => Promise<unknown>;
		const refused = await submit(event(ana, { method: 'POST', body: new FormData() }));
		expect(refused).toMatchObject({ status: 400, data: { message: expect.stringMatching(/problem/) } });

		expect((await put(ana, { revision: 3, definition: base })).status).toBe(200);
		await expect(submit(event(ana, { method: 'POST', body: new FormData() }))).rejects.toMatchObject({
			status: 303,
			location: `/flows/${FLOW}?submitted=1`
		});
		// In review: no more edits.
		expect((await put(ana, { revision: 4, definition: base })).status).toBe(409);
	});
});

describe('review route', () => {
	const post = (user: User, name: 'submit' | 'approve' | 'sendBack', fields: Record<string, string> = {}) => {
		const body = new FormData();
		for (const [k, v] of Object.entries(fields)) body.set(k, v);
		return (actions[name] as (e: unknown) => Promise<unknown>)(event(user, { method: 'POST', body }));
	};

	it('offers the review to another senior and tells the author why not', async () => {
		const mine = await load(ana);
		expect(mine.review?.refusal).toMatch(/You wrote this draft/);
		expect(mine.review?.author).toBe('Ana');
		const theirs = await load(ben);
		expect(theirs.review).toMatchObject({ refusal: null, author: 'Ana' });
		expect(theirs.review?.diff).not.toBeNull();
		expect(theirs.review?.stats.steps).toBe(Object.keys(base.steps).length);
		expect(await library.awaitingReview()).toEqual([
			expect.objectContaining({ id: draftId, flowId: FLOW, authorName: 'Ana' })
		]);
	});

	it('refuses the author approving or sending back their own draft with a clear message', async () => {
		expect(await post(ana, 'approve')).toMatchObject({
			status: 403,
			data: { message: expect.stringMatching(/You wrote this draft, so you cannot approve it/) }
		});
		expect(await post(ana, 'sendBack', { comment: 'Looks fine to me' })).toMatchObject({
			status: 403,
			data: {
				form: {
					id: 'send-back',
					data: { comment: 'Looks fine to me' },
					errors: { _errors: [expect.stringMatching(/You wrote this draft/)] }
				}
			}
		});
		expect((await load(ana)).draft.status).toBe('in-review');
	});

	it('sends back with a comment the author then sees; an empty comment is refused', async () => {
		expect(await post(ben, 'sendBack', { comment: '   ' })).toMatchObject({
			status: 400,
			data: {
				form: { valid: false, errors: { comment: [expect.stringMatching(/Say what needs changing/)] } }
			}
		});
		expect((await load(ana)).draft.status).toBe('in-review');
		await expect(
			post(ben, 'sendBack', { comment: 'Add the flux-fumes caution to the cleaning step.' })
		).rejects.toMatchObject({ status: 303, location: `/flows/${FLOW}?sentBack=1` });
		const data = await load(ana);
		expect(data.draft).toMatchObject({
			status: 'draft',
			reviewComment: 'Add the flux-fumes caution to the cleaning step.'
		});
		expect(data.review).toBeNull();
	});

	it('publishes the approved draft as the next version number', async () => {
		const before = (await library.currentPublished(FLOW))!.version!;
		await expect(post(ana, 'submit')).rejects.toMatchObject({ status: 303 });
		await expect(post(tom, 'approve')).rejects.toMatchObject({ status: 403 });
		await expect(post(ben, 'approve')).rejects.toMatchObject({
			status: 303,
			location: `/flows/${FLOW}?published=${before + 1}`
		});
		const now = (await library.currentPublished(FLOW))!;
		expect(now).toMatchObject({ id: draftId, version: before + 1, status: 'published' });
		expect(await library.awaitingReview()).toEqual([]);
		// Published: approving again is refused, with the reason.
		expect(await post(ben, 'approve')).toMatchObject({ status: 409 });
	});
});
