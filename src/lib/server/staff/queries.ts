import { RuleError } from '$lib/server/errors';
import { and, asc, eq, ne, sql } from 'drizzle-orm';
import { getDb, type Tx } from '$lib/server/db';
import { users, auditLog, type User } from '$lib/server/db/schema';
import { record } from '$lib/server/audit';
import { hashPassword } from '$lib/server/passwords';
import type { Role } from '$lib/roles';

export type StaffMember = Omit<User, 'passwordHash'>;

const publicColumns = {
	id: users.id,
	name: users.name,
	email: users.email,
	role: users.role,
	disabled: users.disabled,
	mustChangePassword: users.mustChangePassword,
	sessionGeneration: users.sessionGeneration,
	createdAt: users.createdAt,
	updatedAt: users.updatedAt
};

export async function findByEmail(email: string) {
	const db = await getDb();
	const [user] = await db
		.select()
		.from(users)
		.where(eq(sql`lower(${users.email})`, email.trim().toLowerCase()));
	return user;
}

export async function findById(id: string): Promise<StaffMember | undefined> {
	const db = await getDb();
	const [user] = await db.select(publicColumns).from(users).where(eq(users.id, id));
	return user;
}

// The signed-in user is looked up on every request (hooks/user.ts). This short-lived cache keeps that
// lookup off the database; every staff write below clears it, so in this process a disabled account
// or a changed role counts at once. Other processes sharing a PostgreSQL server see a change within
// SIGNED_IN_CACHE_MS.
const SIGNED_IN_CACHE_MS = 2000;
const signedIn = new Map<string, { member: StaffMember | undefined; until: number }>();

/** findById for the per-request user lookup, cached briefly and cleared by every staff write. */
export async function findSignedIn(id: string): Promise<StaffMember | undefined> {
	const now = Date.now();
	const hit = signedIn.get(id);
	if (hit && hit.until > now) return hit.member;
	const member = await findById(id);
	if (signedIn.size >= 1000) signedIn.clear();
	signedIn.set(id, { member, until: now + SIGNED_IN_CACHE_MS });
	return member;
}

/** Forgets every cached signed-in user (caches.ts; staff writes do it themselves). */
export function forgetSignedIn() {
	signedIn.clear();
}

/** Runs a staff write and forgets every cached signed-in user, before and after it commits. */
async function staffWrite<T>(write: () => Promise<T>): Promise<T> {
	signedIn.clear();
	try {
		return await write();
	} finally {
		signedIn.clear();
	}
}

export async function list(): Promise<StaffMember[]> {
	const db = await getDb();
	return db.select(publicColumns).from(users).orderBy(asc(users.disabled), asc(users.name));
}

export async function count() {
	const db = await getDb();
	const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(users);
	return n;
}

export async function create(
	actorId: string | null,
	input: { name: string; email: string; role: Role; password: string; mustChangePassword?: boolean }
) {
	const db = await getDb();
	const passwordHash = await hashPassword(input.password);
	return staffWrite(() =>
		db.transaction(async (tx) => {
			if (await emailTaken(tx, input.email)) {
				throw new RuleError(400, 'exists', 'Someone on the staff already uses this e-mail address.', {
					field: 'email'
				});
			}
			const [created] = await tx
				.insert(users)
				.values({
					name: input.name.trim(),
					email: input.email.trim().toLowerCase(),
					role: input.role,
					passwordHash,
					mustChangePassword: input.mustChangePassword ?? true
				})
				.returning(publicColumns);
			await record(tx, {
				actorId,
				action: 'staff.create',
				targetType: 'user',
				targetId: created.id,
				details: { email: created.email, role: created.role }
			});
			return created;
		})
	);
}

export async function changeRole(actorId: string, id: string, role: Role) {
	const db = await getDb();
	return staffWrite(() =>
		db.transaction(async (tx) => {
			const target = await lockUser(tx, id);
			if (target.role === role) return target;
			if (target.role === 'lead' && !target.disabled) await assertAnotherActiveLead(tx, id, 'role');
			const [updated] = await tx
				.update(users)
				.set({ role, sessionGeneration: sql`${users.sessionGeneration} + 1`, updatedAt: new Date() })
				.where(eq(users.id, id))
				.returning(publicColumns);
			await record(tx, {
				actorId,
				action: 'staff.role',
				targetType: 'user',
				targetId: id,
				details: { from: target.role, to: role }
			});
			return updated;
		})
	);
}

export async function setDisabled(actorId: string, id: string, disabled: boolean) {
	const db = await getDb();
	return staffWrite(() =>
		db.transaction(async (tx) => {
			const target = await lockUser(tx, id);
			if (target.disabled === disabled) return target;
			if (disabled && target.role === 'lead') await assertAnotherActiveLead(tx, id, 'disabled');
			const [updated] = await tx
				.update(users)
				.set({ disabled, sessionGeneration: sql`${users.sessionGeneration} + 1`, updatedAt: new Date() })
				.where(eq(users.id, id))
				.returning(publicColumns);
			await record(tx, {
				actorId,
				action: disabled ? 'staff.disable' : 'staff.enable',
				targetType: 'user',
				targetId: id
			});
			return updated;
		})
	);
}

/**
 * Sets a member's password and ends their sessions: a temporary one from the lead (to change at
 * the next sign-in), or the member's own.
 */
async function setPassword(
	actorId: string,
	id: string,
	password: string,
	mustChangePassword: boolean,
	action: 'staff.reset-password' | 'staff.change-password'
) {
	const db = await getDb();
	const passwordHash = await hashPassword(password);
	await staffWrite(() =>
		db.transaction(async (tx) => {
			await lockUser(tx, id);
			await tx
				.update(users)
				.set({
					passwordHash,
					mustChangePassword,
					sessionGeneration: sql`${users.sessionGeneration} + 1`,
					updatedAt: new Date()
				})
				.where(eq(users.id, id));
			await record(tx, { actorId, action, targetType: 'user', targetId: id });
		})
	);
}

export function resetPassword(actorId: string, id: string, temporaryPassword: string) {
	return setPassword(actorId, id, temporaryPassword, true, 'staff.reset-password');
}

export function changeOwnPassword(id: string, newPassword: string) {
	return setPassword(id, id, newPassword, false, 'staff.change-password');
}

/** Signs a member out everywhere: every session token issued before now stops working. */
export async function endSessions(id: string) {
	const db = await getDb();
	await staffWrite(() =>
		db
			.update(users)
			.set({ sessionGeneration: sql`${users.sessionGeneration} + 1` })
			.where(eq(users.id, id))
	);
}

export async function auditFor(targetType: string, targetId?: string, limit = 50) {
	const db = await getDb();
	const where = targetId
		? and(eq(auditLog.targetType, targetType), eq(auditLog.targetId, targetId))
		: eq(auditLog.targetType, targetType);
	return db
		.select({
			id: auditLog.id,
			action: auditLog.action,
			targetId: auditLog.targetId,
			details: auditLog.details,
			at: auditLog.at,
			actorName: users.name
		})
		.from(auditLog)
		.leftJoin(users, eq(users.id, auditLog.actorId))
		.where(where)
		.orderBy(sql`${auditLog.at} desc, ${auditLog.id} desc`)
		.limit(limit);
}

async function emailTaken(tx: Tx, email: string) {
	const [row] = await tx
		.select({ id: users.id })
		.from(users)
		.where(eq(sql`lower(${users.email})`, email.trim().toLowerCase()));
	return Boolean(row);
}

async function lockUser(tx: Tx, id: string) {
	const [target] = await tx.select(publicColumns).from(users).where(eq(users.id, id)).for('update');
	if (!target) throw new RuleError(400, 'not-found', 'No staff member with this id.', { field: 'id' });
	return target;
}

// Leads are locked in id order inside the transaction, so two leads demoting each other at once
// cannot both pass this check on a PostgreSQL server.
async function assertAnotherActiveLead(tx: Tx, exceptId: string, field: string) {
	const others = await tx
		.select({ id: users.id })
		.from(users)
		.where(and(eq(users.role, 'lead'), eq(users.disabled, false), ne(users.id, exceptId)))
		.orderBy(asc(users.id))
		.for('update');
	if (others.length === 0) {
		throw new RuleError(
			400,
			'last-lead',
			'This is the last active shop lead. Make someone else a lead first, so the shop keeps an administrator.',
			{ field }
		);
	}
}
