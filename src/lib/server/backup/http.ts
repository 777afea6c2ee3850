import crypto from 'node:crypto';
import type { RequestEvent } from '@sveltejs/kit';
import { requireRole } from '$lib/server/guards';
import { backupConfig } from './config';

const digest = (s: string) => crypto.createHash('sha256').update(s).digest();

/**
 * Who asks for a backup: `npm run backup` with the BACKUP_TOKEN both it and the app were given
 * (compared in constant time), or else a signed-in lead (401/403 for anyone else).
 */
export function requireBackupCaller(event: RequestEvent): 'command' | 'lead' {
	const token = backupConfig().BACKUP_TOKEN;
	const given = /^Bearer (\S+)$/.exec(event.request.headers.get('authorization') ?? '')?.[1];
	if (token && given && crypto.timingSafeEqual(digest(given), digest(token))) return 'command';
	requireRole(event, 'lead');
	return 'lead';
}
