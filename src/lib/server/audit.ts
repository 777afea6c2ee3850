import type { DB, Tx } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';

export type AuditInput = {
	actorId: string | null;
	action: string;
	targetType: string;
	targetId?: string | null;
	details?: Record<string, unknown>;
};

/** Written inside the caller's transaction, so a change and its audit entry land together or not at all. */
export async function record(tx: DB | Tx, entry: AuditInput) {
	await tx
		.insert(auditLog)
		.values({ ...entry, targetId: entry.targetId ?? null, details: entry.details ?? {} });
}
