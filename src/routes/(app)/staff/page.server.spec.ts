import { beforeAll, describe, expect, it, vi } from 'vitest';
import { member, type Member } from '$lib/server/testing/world';
import * as staff from '$lib/server/staff/queries';
import { postAction } from '$lib/server/testing/actions';
import { actions } from './+page.server';

// The staff rows' forms through superforms (one per member and action, id `<action>-<member id>`),
// on the in-memory database: a refusal says why on that row, a good post says what changed.
let lead: Member;
let tech: Member;

function post(action: 'role' | 'disabled' | 'reset', fields: Record<string, string>) {
	return postAction(actions[action], `/staff?/${action}`, fields, {
		locals: { user: lead },
		routeId: '/(app)/staff'
	});
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	lead = await member('Ansel Morrow', 'ansel@staff-rows.test', 'lead');
	tech = await member('Brin Hollis', 'brin@staff-rows.test', 'technician');
});

describe('staff row forms', () => {
	it('changes a role, and refuses to demote the last active lead with the rule’s status', async () => {
		const changed = await post('role', { id: tech.id, role: 'senior' });
		expect(changed).toMatchObject({
			status: 200,
			form: { id: `role-${tech.id}`, message: 'Role changed to senior.' }
		});
		const leads = (await staff.list()).filter((m) => m.role === 'lead' && !m.disabled);
		expect(leads.map((m) => m.id)).toEqual([lead.id]);
		const refused = await post('role', { id: lead.id, role: 'technician' });
		expect(refused.status).toBeGreaterThanOrEqual(400);
		expect(refused.form.errors._errors?.[0] ?? refused.form.errors.role?.[0]).toMatch(
			/last active shop lead/
		);
		expect((await staff.list()).find((m) => m.id === lead.id)?.role).toBe('lead');
	});

	it('disables and enables again', async () => {
		expect(await post('disabled', { id: tech.id, disabled: 'true' })).toMatchObject({
			form: { message: 'Disabled: they can no longer sign in.' }
		});
		expect((await staff.list()).find((m) => m.id === tech.id)?.disabled).toBe(true);
		expect(await post('disabled', { id: tech.id, disabled: 'false' })).toMatchObject({
			form: { message: 'Enabled again.' }
		});
		expect((await staff.list()).find((m) => m.id === tech.id)?.disabled).toBe(false);
	});

	it('refuses a short temporary password beside the field and never sends a password back', async () => {
		const short = await post('reset', { id: tech.id, password: 'short' });
		expect(short.status).toBe(400);
		expect(short.form.errors.password?.[0]).toBe('Use at least 10 characters.');
		expect(short.form.data.password).toBe('');
		const done = await post('reset', { id: tech.id, password: 'harbour-bell-77' });
		expect(done).toMatchObject({ status: 200, form: { valid: true, data: { password: '' } } });
		expect(done.form.message).toMatch(/^Password reset/);
	});
});
