import { describe, expect, it } from 'vitest';
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
});
