import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { getDb } from '$lib/server/db';
import { outgoingMail } from '$lib/server/db/schema/mail';
import { member, type Member } from '$lib/server/testing/world';
import { postAction } from '$lib/server/testing/actions';
import { actions } from './+page.server';

// The Outbox's "Send a test message" (send-test) and "Retry now" (retry-<mail id>) superforms, on
// the in-memory database: each answer is the form with its message or refusal, and the queue shows it.
let lead: Member;

function post(action: 'test' | 'retry', fields: Record<string, string>) {
	return postAction(actions[action], `/outbox?/${action}`, fields, {
		locals: { user: lead },
		routeId: '/(app)/outbox'
	});
}
const mailsTo = async (to: string) =>
	(await getDb()).select().from(outgoingMail).where(eq(outgoingMail.to, to));

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	lead = await member('Asta Kerr', 'asta@outbox-page.test', 'lead');
});

describe('outbox forms', () => {
	it('keeps a bad address beside its field, queues a good one, and retries only a failed mail', async () => {
		const bad = await post('test', { to: 'not an address' });
		expect(bad).toMatchObject({ status: 400, form: { id: 'send-test', data: { to: 'not an address' } } });
		expect(bad.form.errors.to?.[0]).toMatch(/e-mail address/);
		expect(await mailsTo('not an address')).toEqual([]);

		const to = 'bench-check@outbox-page.test';
		const queued = await post('test', { to });
		expect(queued).toMatchObject({ status: 200, form: { message: `A test message to ${to} is queued.` } });
		const [mail] = await mailsTo(to);
		expect(mail.status).toBe('queued');

		const notFailed = await post('retry', { id: mail.id });
		expect(notFailed).toMatchObject({ status: 400, form: { id: `retry-${mail.id}` } });
		expect(notFailed.form.errors._errors?.[0]).toMatch(/Only a failed mail/);

		const db = await getDb();
		await db.update(outgoingMail).set({ status: 'failed', attempts: 5 }).where(eq(outgoingMail.id, mail.id));
		const retried = await post('retry', { id: mail.id });
		expect(retried).toMatchObject({ status: 200, form: { message: expect.stringMatching(/Queued again/) } });
		expect((await mailsTo(to))[0]).toMatchObject({ status: 'queued', attempts: 0 });

		const malformed = await post('retry', { id: 'x' });
		expect(malformed).toMatchObject({
			status: 400,
			form: { id: 'retry-x', errors: { id: ['That request was malformed.'] } }
		});
	});
});
