import { beforeAll, describe, expect, it } from 'vitest';
import { getHandle } from './db';
import { clearFailedSignIns, recordFailedSignIn, signInBlockedFor, signInLimits } from './ratelimit';

describe('sign-in rate limit', () => {
	// The store follows the database (memory on the embedded one): open it outside the tests' time.
	beforeAll(async () => {
		await getHandle();
	}, 120_000);

	it('blocks an e-mail after 10 failures within 15 minutes, for the rest of the window', async () => {
		expect(signInLimits).toEqual({ windowMinutes: 15, maxFailures: 10 });
		for (let i = 0; i < 9; i++) await recordFailedSignIn('a@x.test', `10.0.0.${i}`);
		expect(await signInBlockedFor('a@x.test', '10.0.0.99')).toBe(0);
		await recordFailedSignIn('a@x.test', '10.0.0.9');
		const wait = await signInBlockedFor('a@x.test', '10.0.0.99');
		expect(wait).toBeGreaterThan(14 * 60);
		expect(wait).toBeLessThanOrEqual(15 * 60);
	});

	it('blocks an address that tries many e-mails', async () => {
		for (let i = 0; i < 10; i++) await recordFailedSignIn(`u${i}@x.test`, '192.0.2.7');
		expect(await signInBlockedFor('fresh@x.test', '192.0.2.7')).toBeGreaterThan(0);
		expect(await signInBlockedFor('fresh@x.test', '192.0.2.8')).toBe(0);
	});

	it("forgets an e-mail's failures after a successful sign-in", async () => {
		for (let i = 0; i < 10; i++) await recordFailedSignIn('b@x.test', `198.51.100.${i}`);
		await clearFailedSignIns('b@x.test');
		expect(await signInBlockedFor('b@x.test', '198.51.100.200')).toBe(0);
	});
});
