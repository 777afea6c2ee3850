// The environment the backups read, parsed once per call (tests change it).
import { z } from 'zod';

const schema = z.object({
	/** Lets `npm run backup` ask the running app for a backup (Authorization: Bearer …). */
	BACKUP_TOKEN: z.string().trim().min(24, 'BACKUP_TOKEN must be at least 24 characters.').optional(),
	/** 'off' stops the app's own scheduled backups (the command still works). */
	BACKUP_SCHEDULE: z.enum(['on', 'off']).default('on')
});

export function backupConfig() {
	const raw = {
		BACKUP_TOKEN: process.env.BACKUP_TOKEN?.trim() || undefined,
		BACKUP_SCHEDULE: process.env.BACKUP_SCHEDULE?.trim().toLowerCase() || undefined
	};
	const parsed = schema.safeParse(raw);
	if (!parsed.success) throw new Error(`Backup settings: ${parsed.error.issues[0]?.message}`);
	return parsed.data;
}
