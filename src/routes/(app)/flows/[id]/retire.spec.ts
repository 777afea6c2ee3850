import { beforeAll, describe, expect, it, vi } from 'vitest';
import * as staff from '$lib/server/staff/queries';
import * as library from '$lib/server/flows/queries';
import { actions } from './+page.server';

// The retire form action called as SvelteKit calls it, against the real in-memory PGlite.
type Who = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
let lead: Who, tech: Who;

function event(user: Who, version: string) {
	const body = new FormData();
	body.set('version', version);
	const url = new URL('http://x.test/flows/no-sound-after-liquid?/retire');
	const request = new Request(url, { method: 'POST', body });
	return {
		locals: { user },
		params: { id: 'no-sound-after-liquid' },
		request,
		url,
		route: { id: '/(app)/flows/[id]' }
	} as never;
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	const make = async (name: string, role: Who['role']) => {
		const u = await staff.create(null, {
			name,
			email: `${name}@retire.test`,
			role,
			password: `${name}-password-1`
		});
		return { id: u.id, name, email: u.email, role };
	};
	lead = await make('lia', 'lead');
	tech = await make('tam', 'technician');
});

describe('retire action', () => {
	it('is refused to a technician, refuses bad input, and retires a published version once', async () => {
		await expect(actions.retire(event(tech, '1'))).rejects.toMatchObject({ status: 403 });
		expect(await actions.retire(event(lead, 'one'))).toMatchObject({
			status: 400,
			data: { form: { valid: false, errors: { version: ['Choose a version to retire.'] } } }
		});
		expect((await library.getVersion('no-sound-after-liquid', 1))!.status).toBe('published');
		expect(await actions.retire(event(lead, '1'))).toMatchObject({
			form: { id: 'retire-1', message: expect.stringMatching(/Version 1 is retired/) }
		});
		expect((await library.getVersion('no-sound-after-liquid', 1))!.status).toBe('retired');
		const again = await actions.retire(event(lead, '1'));
		expect(again).toMatchObject({
			status: 409,
			data: { form: { errors: { _errors: [expect.any(String)] } } }
		});
		expect(await actions.retire(event(lead, '7'))).toMatchObject({ status: 404 });
	});
});
