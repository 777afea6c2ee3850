/**
 * Private report links: a random 256-bit token, shown once (in the e-mail and to the staff member
 * who sent it), stored only as its SHA-256. A link opens one job's customer report until it
 * expires or is revoked; every refusal looks the same from outside.
 */
import crypto from 'node:crypto';
import { and, desc, eq, isNull } from 'drizzle-orm';
import { getDb, type DB, type Tx } from '$lib/server/db';
import { reportLinks, type ReportLink } from '$lib/server/db/schema/quotes';
import { record } from '$lib/server/audit';

/** 32 random bytes → 43 base64url characters (256 bits; the issue asks for at least 128). */
export function newToken(): string {
	return crypto.randomBytes(32).toString('base64url');
}

export function hashToken(token: string): string {
	return crypto.createHash('sha256').update(token, 'utf8').digest('hex');
}

const tokenShape = /^[A-Za-z0-9_-]{43}$/;

const DAY_MS = 24 * 60 * 60 * 1000;

/** Creates a link for a job inside the caller's transaction; the token is returned, never stored. */
export async function create(
	tx: Tx,
	jobId: string,
	actorId: string | null,
	lifetimeDays: number,
	now = new Date()
): Promise<{ token: string; link: ReportLink }> {
	const token = newToken();
	const [link] = await tx
		.insert(reportLinks)
		.values({
			jobId,
			tokenHash: hashToken(token),
			expiresAt: new Date(now.getTime() + lifetimeDays * DAY_MS),
			createdBy: actorId,
			createdAt: now
		})
		.returning();
	await record(tx, {
		actorId,
		action: 'report-link.create',
		targetType: 'job',
		targetId: jobId,
		details: { linkId: link.id, expiresAt: link.expiresAt.toISOString() }
	});
	return { token, link };
}

/**
 * The live link a token opens, or null — for an unknown, malformed, expired or revoked token
 * alike, so the caller cannot tell (and cannot tell a visitor) which.
 */
export async function resolve(token: string, now = new Date()): Promise<ReportLink | null> {
	if (!tokenShape.test(token)) return null;
	const db = await getDb();
	const [link] = await db
		.select()
		.from(reportLinks)
		.where(eq(reportLinks.tokenHash, hashToken(token)));
	if (!link || link.revokedAt || link.expiresAt.getTime() <= now.getTime()) return null;
	return link;
}

/** Records that the customer opened the page (shown to staff beside the link). */
export async function touch(linkId: string) {
	const db = await getDb();
	await db.update(reportLinks).set({ lastOpenedAt: new Date() }).where(eq(reportLinks.id, linkId));
}

export async function listForJob(jobId: string, db?: DB | Tx): Promise<ReportLink[]> {
	const d = db ?? (await getDb());
	return d
		.select()
		.from(reportLinks)
		.where(eq(reportLinks.jobId, jobId))
		.orderBy(desc(reportLinks.createdAt));
}

/** Revokes one link of a job (staff). Revoking twice changes nothing. */
export async function revoke(jobId: string, linkId: string, actorId: string): Promise<boolean> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const [updated] = await tx
			.update(reportLinks)
			.set({ revokedAt: new Date(), revokedBy: actorId })
			.where(and(eq(reportLinks.id, linkId), eq(reportLinks.jobId, jobId), isNull(reportLinks.revokedAt)))
			.returning();
		if (updated)
			await record(tx, {
				actorId,
				action: 'report-link.revoke',
				targetType: 'job',
				targetId: jobId,
				details: { linkId }
			});
		return Boolean(updated);
	});
}
