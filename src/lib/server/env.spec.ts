import { afterEach, describe, expect, it } from 'vitest';
import { checkServerEnv, env, EnvError, readEnv } from './env';

describe('environment', () => {
	it('states the defaults of everything left unset', () => {
		const e = readEnv({});
		expect(e).toMatchObject({
			PORT: 3000,
			DATA_DIR: './data',
			DATABASE_POOL_SIZE: 10,
			DEMO_PASSWORD: 'tidemark-demo',
			TIDEMARK_DEMO: false,
			TIDEMARK_FAKES: false,
			TIDEMARK_DIAGNOSTICS: false,
			FLOWS_DIR: 'flows',
			MAIL_FROM: 'Tidemark <no-reply@tidemark.invalid>'
		});
		for (const name of ['DATABASE_URL', 'SMTP_URL', 'STRIPE_SECRET_KEY', 'TIDEMARK_DEMO_HISTORY'] as const)
			expect(e[name]).toBeUndefined();
	});

	it('reads blank values as unset and numbers and switches as such', () => {
		const e = readEnv({ SMTP_URL: '  ', PORT: ' 4100 ', TIDEMARK_DEMO: '1', TIDEMARK_DEMO_HISTORY: '300' });
		expect(e.SMTP_URL).toBeUndefined();
		expect(e.PORT).toBe(4100);
		expect(e.TIDEMARK_DEMO).toBe(true);
		expect(e.TIDEMARK_DEMO_HISTORY).toBe(300);
	});

	it.each([
		['DATABASE_POOL_SIZE', 'ten'],
		['PORT', '70000'],
		['TIDEMARK_DEMO', 'yes'],
		['DATABASE_URL', 'mysql://db.example.test/shop'],
		['SMTP_URL', 'mail.example.test'],
		['ORIGIN', 'localhost:3000'],
		['STRIPE_WEBHOOK_SECRET', 'not-a-signing-secret'],
		['TIDEMARK_DEMO_HISTORY', '-1']
	])('a bad %s names the variable, not its value', (name, value) => {
		let error: unknown;
		try {
			readEnv({ [name]: value });
		} catch (e) {
			error = e;
		}
		expect(error).toBeInstanceOf(EnvError);
		expect((error as EnvError).problems.map((p) => p.name)).toEqual([name]);
		expect((error as EnvError).message).toContain(`${name}: expected`);
		expect((error as EnvError).message).not.toContain(value);
	});

	it('names every bad variable at once', () => {
		expect(() => readEnv({ PORT: 'x', SMTP_URL: 'y' })).toThrow(/PORT: .*\n.*SMTP_URL: /);
	});
});

describe('env() in this process', () => {
	const saved = process.env.MAIL_FROM;
	afterEach(() => {
		if (saved === undefined) delete process.env.MAIL_FROM;
		else process.env.MAIL_FROM = saved;
	});

	it('sees a variable a test sets, without a reset', () => {
		process.env.MAIL_FROM = 'Shop <shop@example.test>';
		expect(env().MAIL_FROM).toBe('Shop <shop@example.test>');
		delete process.env.MAIL_FROM;
		expect(env().MAIL_FROM).toBe('Tidemark <no-reply@tidemark.invalid>');
	});

	it('start-up refuses a server without AUTH_SECRET', () => {
		const secret = process.env.AUTH_SECRET;
		delete process.env.AUTH_SECRET;
		try {
			expect(() => checkServerEnv()).toThrow(/AUTH_SECRET: not set/);
		} finally {
			process.env.AUTH_SECRET = secret;
		}
		expect(checkServerEnv().AUTH_SECRET).toBe(secret);
	});
});
