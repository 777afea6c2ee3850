import { expect, it } from 'vitest';

it('turns zod’s jitless mode on without importing zod', async () => {
	const holder = globalThis as { __zod_globalConfig?: { jitless?: boolean } };
	delete holder.__zod_globalConfig;
	await import('./hooks.client');
	const { config } = await import('zod/v4/core');
	expect(config().jitless).toBe(true);
});
