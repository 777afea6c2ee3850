// The environment the backups read (checked once, with every other variable, in $lib/server/env).
import { env } from '$lib/server/env';

export function backupConfig() {
	const e = env();
	return {
		BACKUP_TOKEN: e.BACKUP_TOKEN,
		BACKUP_SCHEDULE: e.BACKUP_SCHEDULE,
		TIDEMARK_URL: e.TIDEMARK_URL,
		PG_DUMP: e.PG_DUMP,
		PG_RESTORE: e.PG_RESTORE
	};
}
