import { describe, expect, it, vi } from 'vitest';
import pg from 'pg';
import { sql } from 'drizzle-orm';

// The same schema and migrations on a PostgreSQL server. Runs when TEST_DATABASE_URL names a
// disposable database (.ci/run starts one); without it there is no server here to test against.
const url = process.env.TEST_DATABASE_URL;

describe.runIf(url)('PostgreSQL server (DATABASE_URL)', () => {
	it('migrates the committed schema and answers through the same handle', async () => {
		process.env.DATABASE_URL = url;
		const { openDatabase } = await import('./index');
		const handle = await openDatabase();
		try {
			expect(handle.kind).toBe('postgres');
			const { rows } = (await handle.db.execute(
				sql`select count(*)::int as n from information_schema.tables where table_name in ('users', 'audit_log')`
			)) as unknown as { rows: { n: number }[] };
			expect(rows[0].n).toBe(2);
			// Migrating again is a no-op.
			const again = await openDatabase();
			await again.close();
		} finally {
			await handle.close();
			delete process.env.DATABASE_URL;
		}
	});

	it('lives through the server ending its idle connections: the error is logged, the next query gets a new one', async () => {
		process.env.DATABASE_URL = url;
		const { openDatabase } = await import('./index');
		const handle = await openDatabase();
		const logged: string[] = [];
		const spy = vi.spyOn(console, 'error').mockImplementation((m) => void logged.push(String(m)));
		try {
			const pid = async () =>
				(
					(await handle.db.execute(sql`select pg_backend_pid() as pid`)) as unknown as {
						rows: { pid: number }[];
					}
				).rows[0].pid;
			const before = await pid();
			const admin = new pg.Client({ connectionString: url });
			await admin.connect();
			await admin.query('select pg_terminate_backend($1)', [before]);
			await admin.end();
			await vi.waitFor(() => expect(logged.join('\n')).toMatch(/idle PostgreSQL connection ended/));
			expect(await pid()).not.toBe(before);
		} finally {
			spy.mockRestore();
			await handle.close();
			delete process.env.DATABASE_URL;
		}
	});
});
