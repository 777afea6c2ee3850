import { getStore, forgetBases } from './idb-store';
import { forgetRunPages } from './caches';

/** What this technician has entered on this device that the server has not stored yet. */
export async function countUnsent(userId: string) {
	const entries = (await (await getStore()).all()).filter((e) => e.userId === userId);
	return {
		answers: entries.filter((e) => e.kind === 'event').length,
		photos: entries.filter((e) => e.kind === 'photo').length
	};
}

/**
 * Before signing out on a shared tablet: the kept run pages and run copies carry this session's
 * data, so they go. Waiting entries stay, tied to their technician, and are sent when they sign in
 * here again.
 */
export async function forgetDevice() {
	await Promise.allSettled([forgetRunPages(), forgetBases()]);
}
