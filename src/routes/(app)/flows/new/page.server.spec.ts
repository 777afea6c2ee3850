import fs from 'node:fs';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as staff from '$lib/server/staff/queries';
import * as library from '$lib/server/flows/queries';
import { actions, load } from './+page.server';
import { MAX_UPLOAD_BYTES } from './schema';

// Real in-memory PGlite (DATA_DIR=memory://); the handlers called with a minimal RequestEvent.
type User = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
let ana: User, tom: User;
const shipped = fs.readFileSync('flows/no-power-after-liquid.flow.yaml', 'utf8');

async function person(name: string, role: User['role']): Promise<User> {
	const email = `${name.toLowerCase()}@new-flow.test`;
	const created = await staff.create(null, { name, email, role, password: `${name}-password-1` });
	return { id: created.id, name, email, role };
}

function event(user: User, body?: FormData, headers: Record<string, string> = {}) {
	const url = new URL('http://shop.test/flows/new');
	return {
		url,
		request: new Request(url, { method: body ? 'POST' : 'GET', body, headers }),
		params: {},
		locals: { user },
		route: { id: '/(app)/flows/new' },
		cookies: { get: () => undefined }
		// eslint-disable-next-line @typescript-eslint/no-explicit-any
	} as any;
}
const form = (fields: Record<string, string | File>) => {
	const f = new FormData();
	for (const [k, v] of Object.entries(fields)) f.set(k, v);
	return f;
};
type Act = (e: unknown) => Promise<unknown>;
const blank = (user: User, fields: Record<string, string>) =>
	(actions.blank as Act)(event(user, form(fields)));
const upload = (user: User, fields: Record<string, string | File>) =>
	(actions.import as Act)(event(user, form(fields)));

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	ana = await person('Ana', 'senior');
	tom = await person('Tom', 'technician');
});

describe('new flow page', () => {
	it('is for seniors: a technician gets 403 on the page and on both actions', async () => {
		await expect((async () => load(event(tom)))()).rejects.toMatchObject({ status: 403 });
		await expect(blank(tom, { id: 'a-flow', title: 'A flow' })).rejects.toMatchObject({ status: 403 });
		await expect(upload(tom, { text: shipped })).rejects.toMatchObject({ status: 403 });
	});

	it('starts a flow from nothing: one blank step to grow from', async () => {
		await expect(
			blank(ana, { id: 'screen-dark-after-liquid', title: 'Screen dark after liquid' })
		).rejects.toMatchObject({
			status: 303,
			location: expect.stringMatching(/^\/flows\/screen-dark-after-liquid\/drafts\/[0-9a-f-]{36}$/)
		});
		expect((await library.openDrafts('screen-dark-after-liquid'))[0]).toMatchObject({
			status: 'draft',
			authorName: 'Ana'
		});
	});

	it('refuses a bad id, a short title and a taken id, keeping what was typed', async () => {
		expect(await blank(ana, { id: 'Not Kebab', title: 'Ok title' })).toMatchObject({
			status: 400,
			data: {
				form: {
					id: 'blank',
					data: { id: 'Not Kebab', title: 'Ok title' },
					errors: { id: [expect.any(String)] }
				}
			}
		});
		expect(await blank(ana, { id: 'fine-id', title: 'x' })).toMatchObject({
			status: 400,
			data: { form: { errors: { title: [expect.stringMatching(/at least 3/)] } } }
		});
		expect(await blank(ana, { id: 'no-power-after-liquid', title: 'Again' })).toMatchObject({
			status: 409,
			data: {
				form: {
					data: { id: 'no-power-after-liquid', title: 'Again' },
					errors: { id: [expect.stringMatching(/already exists/)] }
				}
			}
		});
		expect(await library.openDrafts('fine-id')).toEqual([]);
	});

	it('imports an uploaded file as a draft of its flow and says how many problems it has', async () => {
		const file = new File([shipped], 'no-power-after-liquid.flow.yaml', { type: 'application/yaml' });
		await expect(upload(ana, { file })).rejects.toMatchObject({
			status: 303,
			location: expect.stringMatching(/^\/flows\/no-power-after-liquid\/drafts\/[0-9a-f-]{36}\?imported=0$/)
		});
	});

	it('refuses text that is not a flow with its problems, and gives the text back', async () => {
		const broken = shipped.replace('title:', 'title: !!js/function "boom" #');
		const res = (await upload(ana, { text: broken })) as {
			status: number;
			data: {
				form: { id: string; data: { text: string }; errors: { _errors: string[] } };
				problems: unknown[];
			};
		};
		expect(res.status).toBe(400);
		expect(res.data.form.id).toBe('import');
		expect(res.data.form.data.text).toBe(broken);
		expect(res.data.form.errors._errors[0]).toMatch(/nothing was imported/);
		expect(res.data.problems.length).toBeGreaterThan(0);
		expect(await upload(ana, { text: '  ' })).toMatchObject({
			status: 400,
			data: { form: { errors: { _errors: [expect.stringMatching(/Choose a/)] } } }
		});
	});

	it('refuses a file over the size limit before reading it', async () => {
		const big = new File(['a'.repeat(MAX_UPLOAD_BYTES + 1)], 'big.flow.yaml');
		expect(await upload(ana, { file: big })).toMatchObject({
			status: 413,
			data: { form: { errors: { _errors: [expect.stringMatching(/at most/)] } } }
		});
		const declared = (actions.import as Act)(
			event(ana, form({ text: 'x' }), { 'content-length': String(MAX_UPLOAD_BYTES * 2) })
		);
		expect(await declared).toMatchObject({ status: 413 });
	});
});
