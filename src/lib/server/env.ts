/**
 * The server's environment, read and checked in one place. `startup()` reads it first, so a bad
 * value stops the server with a message naming the variable; code then asks `env()` instead of
 * reading `process.env`. Empty or blank values count as unset. The README's configuration table
 * describes each variable for the shop; add a new one here, one field a line, under its heading.
 *
 * Test-only variables (TEST_DATABASE_URL, FUZZ_SEED, SHIPPED_FLOWS_DIR) and the scripts that run
 * before the app (scripts/*.mjs) read their own few variables and are not listed here.
 */
import { z } from 'zod';

/** On/off switches: `1` is on; `0` or unset is off. */
const flag = z
	.enum(['0', '1'], { error: 'expected 1 (on) or 0 (off)' })
	.default('0')
	.transform((v) => v === '1');
const httpUrl = z.url({ protocol: /^https?$/, error: 'expected an http:// or https:// address' });
const bucketName = z.string().regex(/^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/, {
	error: 'expected a bucket name (3–63 of a–z, 0–9, dot, hyphen)'
});
const trueFalse = z.enum(['0', '1', 'true', 'false'], { error: 'expected true or false (1 or 0)' });
const wholeNumber = (min: number, max: number) =>
	z.coerce
		.number({ error: `expected a whole number from ${min} to ${max}` })
		.int()
		.min(min)
		.max(max);

export const envSchema = z.object({
	// Server and the addresses it is reached at
	PORT: wholeNumber(0, 65535).default(3000),
	ORIGIN: httpUrl.optional(),
	PUBLIC_BASE_URL: httpUrl.optional(),

	// Database and files
	DATA_DIR: z.string().default('./data'),
	DATABASE_URL: z.url({ protocol: /^postgres(ql)?$/, error: 'expected a postgres:// address' }).optional(),
	DATABASE_POOL_SIZE: wholeNumber(1, 1000).default(10),

	// Sign-in (required by the server, checked in startup(); vitest sets its own)
	AUTH_SECRET: z.string().min(16, { error: 'expected at least 16 characters' }).optional(),

	// Demo and tests
	TIDEMARK_DEMO: flag,
	TIDEMARK_DEMO_HISTORY: wholeNumber(0, 1_000_000).optional(),
	DEMO_PASSWORD: z.string().default('tidemark-demo'),
	TIDEMARK_FAKES: flag,
	TIDEMARK_FAKE_S3: flag,
	TIDEMARK_DIAGNOSTICS: flag,

	// Photo storage: an S3-compatible bucket instead of DATA_DIR/uploads (pairs checked in storage/config.ts)
	S3_BUCKET: bucketName.optional(),
	S3_ENDPOINT: httpUrl.optional(),
	S3_REGION: z.string().default('us-east-1'),
	S3_ACCESS_KEY_ID: z.string().optional(),
	S3_SECRET_ACCESS_KEY: z.string().optional(),
	S3_FORCE_PATH_STYLE: trueFalse.optional(),

	// Flows
	FLOWS_DIR: z.string().default('flows'),

	// Mail
	SMTP_URL: z.url({ protocol: /^smtps?$/, error: 'expected an smtp:// or smtps:// address' }).optional(),
	MAIL_FROM: z.string().default('Tidemark <no-reply@tidemark.invalid>'),

	// Backups (src/lib/server/backup)
	BACKUP_SCHEDULE: z.enum(['on', 'off'], { error: 'expected on or off' }).default('on'),
	BACKUP_TOKEN: z.string().min(24, { error: 'expected at least 24 characters' }).optional(),
	TIDEMARK_URL: httpUrl.optional(),
	PG_DUMP: z.string().default('pg_dump'),
	PG_RESTORE: z.string().default('pg_restore'),

	// Payments
	STRIPE_SECRET_KEY: z
		.string()
		.regex(/^(sk|rk)_/, { error: 'expected a secret key (sk_… or rk_…)' })
		.optional(),
	STRIPE_WEBHOOK_SECRET: z
		.string()
		.regex(/^whsec_/, { error: 'expected a signing secret (whsec_…)' })
		.optional()
});

export type Env = z.output<typeof envSchema>;
type Name = keyof z.input<typeof envSchema>;
const names = Object.keys(envSchema.shape) as Name[];

/** A variable with a value the server cannot use; the message names each one (never its value). */
export class EnvError extends Error {
	constructor(public problems: { name: string; message: string }[]) {
		super(
			`The environment has ${problems.length === 1 ? 'a bad value' : 'bad values'} (see README, Configuration):\n` +
				problems.map((p) => `  ${p.name}: ${p.message}`).join('\n')
		);
		this.name = 'EnvError';
	}
}

/** Checks the variables in `source` (process.env by default); throws EnvError naming each bad one. */
export function readEnv(source: Record<string, string | undefined> = process.env): Env {
	const raw: Partial<Record<Name, string>> = {};
	for (const name of names) {
		const value = source[name]?.trim();
		if (value) raw[name] = value;
	}
	const parsed = envSchema.safeParse(raw);
	if (parsed.success) return parsed.data;
	throw new EnvError(parsed.error.issues.map((i) => ({ name: String(i.path[0]), message: i.message })));
}

// Read again only when one of the variables changed: the server sets none after start-up, and tests
// that set process.env per test see their values without a reset.
let cached: { key: string; value: Env } | undefined;

/** The checked environment of this process. */
export function env(): Env {
	const key = names.map((n) => process.env[n] ?? '\u0000').join('\u0001');
	if (cached?.key !== key) cached = { key, value: readEnv(process.env) };
	return cached.value;
}

/** Start-up: the checked environment, with what the server itself cannot run without. */
export function checkServerEnv(): Env {
	const settings = env();
	if (!settings.AUTH_SECRET)
		throw new EnvError([
			{
				name: 'AUTH_SECRET',
				message: 'not set: set it to a long random string, or use `npm start` for the demo'
			}
		]);
	return settings;
}
