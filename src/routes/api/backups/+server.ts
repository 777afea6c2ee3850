import { json } from '@sveltejs/kit';
import { requireBackupCaller } from '$lib/server/backup/http';
import { BackupRefused } from '$lib/server/backup/archive';
import { backupNow, BackupBusy } from '$lib/server/backup/service';
import { methods } from '$lib/server/backup/manifest';
import type { RequestHandler } from './$types';

/**
 * POST /api/backups — the running app writes a backup into DATA_DIR/backups (the embedded database's
 * folder is locked to this process, so `npm run backup` asks here). Lead, or BACKUP_TOKEN.
 */
export const POST: RequestHandler = async (event) => {
	const trigger = requireBackupCaller(event);
	try {
		const r = await backupNow(trigger);
		const m = r.manifest;
		return json(
			{
				file: r.file,
				bytes: r.bytes,
				ms: r.ms,
				method: m.database.method,
				says: methods[m.database.method].says,
				tool: m.database.tool,
				migrations: m.migrations,
				counts: m.counts,
				photos: m.photos,
				pruned: r.pruned
			},
			{ status: 201 }
		);
	} catch (e) {
		if (e instanceof BackupRefused || e instanceof BackupBusy)
			return json({ message: e.message }, { status: 409 });
		console.error('[backup] failed:', e);
		return json({ message: `The backup failed: ${(e as Error).message}` }, { status: 500 });
	}
};
