import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog, users } from '$lib/server/db/schema';
import { verifyPassword } from '$lib/server/passwords';
import * as staff from './queries';

// Runs against a real in-memory PGlite migrated from drizzle/ (DATA_DIR=memory:// in vite.config.ts).
let leadId: string;

beforeAll(async () => {
	const lead = await staff.create(null, {
		name: 'Ada Quill',
		email: 'Ada@Shop.test',
		role: 'lead',
		password: 'first-lead-pw'
	});
	leadId = lead.id;
});

describe('staff queries', () => {
	it('stores e-mail in lower case, hashes the password with argon2id and never returns the hash', async () => {
		const member = await staff.findById(leadId);
		expect(member).toMatchObject({ email: 'ada@shop.test', role: 'lead', disabled: false });
		expect(member).not.toHaveProperty('passwordHash');
		const full = await staff.findByEmail('ADA@shop.test');
		expect(full!.passwordHash).toMatch(/^\$argon2id\$/);
		expect(await verifyPassword(full!.passwordHash, 'first-lead-pw')).toBe(true);
		expect(await verifyPassword(full!.passwordHash, 'wrong-password')).toBe(false);
	});

	it('refuses a duplicate e-mail whatever its case, writing nothing', async () => {
		const db = await getDb();
		const before = await db.select().from(auditLog);
		await expect(
			staff.create(leadId, {
				name: 'Copy',
				email: 'ADA@shop.test',
				role: 'technician',
				password: 'another-password'
			})
		).rejects.toMatchObject({ field: 'email' });
		expect(await db.select().from(auditLog)).toHaveLength(before.length);
	});

	it('keeps the last active lead: no demotion, no disabling', async () => {
		await expect(staff.changeRole(leadId, leadId, 'senior')).rejects.toThrow(/last active shop lead/);
		await expect(staff.setDisabled(leadId, leadId, true)).rejects.toThrow(/last active shop lead/);
		expect((await staff.findById(leadId))!.role).toBe('lead');
	});

	it('allows demoting a lead once another active lead exists, and audits each change', async () => {
		const second = await staff.create(leadId, {
			name: 'Bo Reed',
			email: 'bo@shop.test',
			role: 'technician',
			password: 'bo-password-1'
		});
		await staff.changeRole(leadId, second.id, 'lead');
		await staff.changeRole(second.id, leadId, 'senior');
		expect((await staff.findById(leadId))!.role).toBe('senior');
		// Bo is now the only lead, so Bo cannot be disabled.
		await expect(staff.setDisabled(leadId, second.id, true)).rejects.toThrow(/last active shop lead/);
		const trail = await staff.auditFor('user', leadId);
		expect(trail.map((e) => e.action)).toContain('staff.role');
		expect(trail.find((e) => e.action === 'staff.role')!.details).toEqual({ from: 'lead', to: 'senior' });
		// restore for later tests
		await staff.changeRole(second.id, leadId, 'lead');
	});

	it('disables and enables a member, and a reset sets must-change', async () => {
		const tech = await staff.create(leadId, {
			name: 'Cy Moss',
			email: 'cy@shop.test',
			role: 'technician',
			password: 'cy-password-1',
			mustChangePassword: false
		});
		expect((await staff.setDisabled(leadId, tech.id, true)).disabled).toBe(true);
		expect((await staff.setDisabled(leadId, tech.id, false)).disabled).toBe(false);
		await staff.resetPassword(leadId, tech.id, 'temporary-pw-9');
		const full = await staff.findByEmail('cy@shop.test');
		expect(full!.mustChangePassword).toBe(true);
		expect(await verifyPassword(full!.passwordHash, 'temporary-pw-9')).toBe(true);
		const actions = (await staff.auditFor('user', tech.id)).map((e) => e.action);
		expect(actions).toEqual(
			expect.arrayContaining(['staff.create', 'staff.disable', 'staff.enable', 'staff.reset-password'])
		);
	});

	it('the per-request lookup sees a disabled account or a changed role at once, despite its cache', async () => {
		const tech = await staff.create(leadId, {
			name: 'Vell Orrin',
			email: 'vell@shop.test',
			role: 'technician',
			password: 'vell-password-1'
		});
		expect((await staff.findSignedIn(tech.id))!.disabled).toBe(false);
		await staff.setDisabled(leadId, tech.id, true);
		expect((await staff.findSignedIn(tech.id))!.disabled).toBe(true);
		await staff.setDisabled(leadId, tech.id, false);
		await staff.changeRole(leadId, tech.id, 'senior');
		expect((await staff.findSignedIn(tech.id))!.role).toBe('senior');
		// A write outside staff/queries.ts is not seen until the two-second cache runs out.
		const db = await getDb();
		await db.update(users).set({ name: 'Vell Orrin-Sade' }).where(eq(users.id, tech.id));
		expect((await staff.findSignedIn(tech.id))!.name).toBe('Vell Orrin');
		expect((await staff.findById(tech.id))!.name).toBe('Vell Orrin-Sade');
	});

	it('rolls back the change when its audit entry cannot be written', async () => {
		const db = await getDb();
		const tech = await staff.create(leadId, {
			name: 'Di Fern',
			email: 'di@shop.test',
			role: 'technician',
			password: 'di-password-1'
		});
		// An actor id that is no user breaks the audit row's foreign key inside the transaction.
		await expect(
			staff.changeRole('00000000-0000-4000-8000-000000000000', tech.id, 'senior')
		).rejects.toThrow();
		const [row] = await db.select().from(users).where(eq(users.id, tech.id));
		expect(row.role).toBe('technician');
	});

	it('rejects a role outside the three at the database too', async () => {
		const db = await getDb();
		await expect(
			db.insert(users).values({ name: 'X', email: 'x@shop.test', role: 'owner' as 'lead', passwordHash: 'x' })
		).rejects.toThrow();
	});
});
