// The migrations in drizzle/ are embedded into the server bundle at build time, so `node build`
// works from any working directory. This yields the same MigrationMeta (and hash) as drizzle's
// readMigrationFiles(), so a database migrated by drizzle-kit and by the app agree.
import crypto from 'node:crypto';
import type { MigrationMeta } from 'drizzle-orm/migrator';

type Journal = { entries: { tag: string; when: number; breakpoints: boolean }[] };

const journal = import.meta.glob<Journal>('/drizzle/meta/_journal.json', { eager: true, import: 'default' })[
	'/drizzle/meta/_journal.json'
];
const files = import.meta.glob<string>('/drizzle/*.sql', { eager: true, query: '?raw', import: 'default' });

export const migrations: MigrationMeta[] = journal.entries.map((entry) => {
	const query = files[`/drizzle/${entry.tag}.sql`];
	return {
		sql: query.split('--> statement-breakpoint'),
		bps: entry.breakpoints,
		folderMillis: entry.when,
		hash: crypto.createHash('sha256').update(query).digest('hex')
	};
});
