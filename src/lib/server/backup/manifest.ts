/**
 * What a backup file says about itself (manifest.json, its first member): the app version and
 * migration level it was taken at, how the database was copied, the row count of every table, and
 * the size and SHA-256 of every other member. Restore checks all of it before touching anything.
 */
import fs from 'node:fs';
import path from 'node:path';
import { readMigrationFiles, type MigrationMeta } from 'drizzle-orm/migrator';
import { z } from 'zod';
import { migrationsDir } from '$lib/server/db';
import pkg from '../../../../package.json';

/** drizzle/'s migrations as drizzle's migrator reads them (same hashes), with their journal tags. */
function codeMigrations(): { migrations: MigrationMeta[]; tags: string[] } {
	const folder = migrationsDir();
	const journal = JSON.parse(fs.readFileSync(path.join(folder, 'meta', '_journal.json'), 'utf8')) as {
		entries: { tag: string }[];
	};
	return {
		migrations: readMigrationFiles({ migrationsFolder: folder }),
		tags: journal.entries.map((e) => e.tag)
	};
}

export const appVersion: string = pkg.version;
export const MANIFEST = 'manifest.json';
export const FORMAT = 'tidemark-backup';

export const methods = {
	'pglite-datadir': {
		member: 'database/pgdata.tar',
		says: "the embedded database's own copy of its data folder (PGlite dumpDataDir)"
	},
	'pg_dump-custom': {
		member: 'database/postgres.dump',
		says: "the PostgreSQL server's own dump tool (pg_dump, custom format)"
	}
} as const;
export type Method = keyof typeof methods;

const sha256Hex = z.string().regex(/^[0-9a-f]{64}$/);

export const migrationLevelSchema = z.object({
	applied: z.number().int().min(0),
	/** The newest applied migration's timestamp (drizzle's folderMillis), 0 when none. */
	latestMillis: z.number().int().min(0),
	latestHash: z.string().nullable(),
	/** Its journal tag when this code knows it. */
	latestTag: z.string().nullable()
});
export type MigrationLevel = z.infer<typeof migrationLevelSchema>;

export const manifestSchema = z.object({
	format: z.literal(FORMAT),
	formatVersion: z.literal(1),
	createdAt: z.iso.datetime(),
	appVersion: z.string(),
	database: z.object({
		method: z.enum(Object.keys(methods) as [Method, ...Method[]]),
		/** e.g. "pg_dump (PostgreSQL) 15.18" or "PGlite 0.5.17". */
		tool: z.string(),
		member: z.string()
	}),
	migrations: migrationLevelSchema,
	/** Rows per table ("jobs", "drizzle.__drizzle_migrations"), counted in the copy itself. */
	counts: z.record(z.string(), z.number().int().min(0)),
	photos: z.object({
		/** How the photos were read: the app's storage interface, by the keys the database names. */
		source: z.string(),
		count: z.number().int().min(0),
		/** Keys the database names that the store did not have (the backup still holds the rest). */
		missing: z.array(sha256Hex)
	}),
	members: z.array(z.object({ path: z.string(), size: z.number().int().min(0), sha256: sha256Hex }))
});
export type Manifest = z.infer<typeof manifestSchema>;

/** The migration level of this code: everything in drizzle/. */
export function codeMigrationLevel(): MigrationLevel {
	const { migrations, tags: migrationTags } = codeMigrations();
	const last = migrations.at(-1);
	return {
		applied: migrations.length,
		latestMillis: last?.folderMillis ?? 0,
		latestHash: last?.hash ?? null,
		latestTag: migrationTags.at(-1) ?? null
	};
}

/** Why this code cannot restore a backup at `level`, or null when it can (older levels migrate at start). */
export function newerThanCode(level: MigrationLevel): string | null {
	const code = codeMigrationLevel();
	const { migrations } = codeMigrations();
	const known = level.latestHash === null || migrations.some((m) => m.hash === level.latestHash);
	if (level.latestMillis > code.latestMillis || level.applied > code.applied || !known) {
		return (
			`This backup's database is at migration level ${level.applied} (${level.latestTag ?? 'a migration this code does not know'}), ` +
			`newer than this version of Tidemark knows (${code.applied}, ${code.latestTag}). ` +
			'Restore it with the version of Tidemark that made it, or a newer one.'
		);
	}
	return null;
}

export function tagOfHash(hash: string | null): string | null {
	if (!hash) return null;
	const { migrations, tags: migrationTags } = codeMigrations();
	const i = migrations.findIndex((m) => m.hash === hash);
	return i < 0 ? null : (migrationTags[i] ?? null);
}
