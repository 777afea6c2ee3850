import { mount, unmount } from 'svelte';
import SignOutUnsent from '$lib/components/SignOutUnsent.svelte';
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

/**
 * Signs out (`go`) at once when nothing waits; otherwise asks first, and signs out only when the
 * technician says so. The kept pages are forgotten either way before leaving.
 */
export async function confirmSignOut(userId: string, go: () => void) {
	const leave = async () => {
		await forgetDevice();
		go();
	};
	const unsent = await countUnsent(userId).catch(() => ({ answers: 0, photos: 0 }));
	if (unsent.answers + unsent.photos === 0) return leave();
	const dialog = mount(SignOutUnsent, {
		target: document.body,
		props: { unsent, onstay: () => void unmount(dialog), onleave: leave }
	});
}
