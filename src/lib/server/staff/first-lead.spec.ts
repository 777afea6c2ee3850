import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { verifyPassword } from '$lib/server/passwords';
import * as staff from './queries';
import { createFirstLead, FirstLeadRefused, temporaryPassword } from './first-lead';

describe('the first lead (npm run lead:create)', () => {
	beforeAll(() => getDb()); // the in-memory database's first opening is slow

	it('makes temporary passwords of 4 × 5 letters and digits without look-alikes, never the same twice', () => {
		const seen = new Set(Array.from({ length: 200 }, temporaryPassword));
		expect(seen.size).toBe(200);
		for (const p of seen) expect(p).toMatch(/^[a-hj-km-np-z2-9]{5}(-[a-hj-km-np-z2-9]{5}){3}$/);
	});

	it('refuses a bad address or name before touching the database', async () => {
		await expect(createFirstLead({ name: 'Ada Quill', email: 'not-an-address' })).rejects.toThrow(
			/valid e-mail/
		);
		await expect(createFirstLead({ name: 'A', email: 'lead@shop.test' })).rejects.toThrow(FirstLeadRefused);
		expect(await staff.count()).toBe(0);
	});

	it('creates one lead who must change the shown password, audited; a second is refused', async () => {
		const { lead, password } = await createFirstLead({ name: ' Ada Quill ', email: 'Ada@Shop.test' });
		expect(lead).toMatchObject({
			name: 'Ada Quill',
			email: 'ada@shop.test',
			role: 'lead',
			mustChangePassword: true
		});
		const stored = await staff.findByEmail('ada@shop.test');
		expect(await verifyPassword(stored!.passwordHash, password)).toBe(true);
		const audit = await (await getDb()).select().from(auditLog).where(eq(auditLog.targetId, lead.id));
		expect(audit.map((a) => a.action)).toEqual(['staff.create']);

		await expect(createFirstLead({ name: 'Bo Ferris', email: 'bo@shop.test' })).rejects.toThrow(
			/already has a lead \(ada@shop\.test\)/
		);
		expect(await staff.count()).toBe(1);
	});
});
