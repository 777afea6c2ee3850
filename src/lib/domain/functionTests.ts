/**
 * The function test a liquid-damage shop runs on a phone: what it checks when the phone comes in
 * (the pre-repair test at intake) and after the repair (the checklists page). One list for both, so
 * the customer report can put "before" and "after" side by side per function.
 *
 * Items follow the device: an item with `needs` is asked only of a model that declares that
 * capability (device_models.capabilities). A model with no declared capabilities (unknown, or typed
 * freely at intake) gets every item: asking one question too many is cheaper than missing a fault.
 * Keys are stored in saved results: never rename one, add a new key instead.
 */

/** Functions that not every phone has. Everything else is asked of every phone. */
export const capabilityCodes = [
	'face-unlock',
	'fingerprint',
	'nfc',
	'wireless-charging',
	'barometer',
	'compass',
	'rear-camera-2',
	'rear-camera-3',
	'headphone-socket'
] as const;
export type Capability = (typeof capabilityCodes)[number];

export const capabilityLabels: Record<Capability, string> = {
	'face-unlock': 'Face unlock',
	fingerprint: 'Fingerprint or biometric button',
	nfc: 'NFC',
	'wireless-charging': 'Wireless charging',
	barometer: 'Barometer',
	compass: 'Compass',
	'rear-camera-2': 'Second rear camera',
	'rear-camera-3': 'Third rear camera',
	'headphone-socket': 'Headphone socket'
};

export type FunctionTestDef = {
	key: string;
	label: string;
	/** Asked only of models that declare this capability. */
	needs?: Capability;
	/** After the repair only: makes no sense (or takes too long) at the counter. */
	afterOnly?: boolean;
};

export const FUNCTION_TESTS: readonly FunctionTestDef[] = [
	{ key: 'boot', label: 'Boot' },
	{ key: 'display', label: 'Display' },
	{ key: 'backlight', label: 'Display backlight (even, no dark patches)' },
	{ key: 'display-stains', label: 'Display free of stains or marks' },
	{ key: 'dead-pixels', label: 'No dead or stuck pixels' },
	{ key: 'touch', label: 'Touch' },
	{ key: 'front-camera', label: 'Front camera' },
	{ key: 'rear-camera', label: 'Rear camera 1 (focus, stabilisation)' },
	{ key: 'rear-camera-2', label: 'Rear camera 2 (focus, stabilisation)', needs: 'rear-camera-2' },
	{ key: 'rear-camera-3', label: 'Rear camera 3 (focus, stabilisation)', needs: 'rear-camera-3' },
	{ key: 'lens-fogging', label: 'No fogging inside the camera lenses' },
	{ key: 'flash', label: 'Flash and torch' },
	{ key: 'face-unlock', label: 'Face unlock', needs: 'face-unlock' },
	{ key: 'fingerprint', label: 'Fingerprint or biometric button', needs: 'fingerprint' },
	{ key: 'earpiece', label: 'Earpiece' },
	{ key: 'proximity', label: 'Proximity sensing' },
	{ key: 'ambient-light', label: 'Ambient-light sensing' },
	{ key: 'motion-sensors', label: 'Motion sensors (tilt, rotation)' },
	{ key: 'compass', label: 'Compass', needs: 'compass' },
	{ key: 'barometer', label: 'Barometer', needs: 'barometer' },
	{ key: 'microphones', label: 'Microphones' },
	{ key: 'loudspeaker', label: 'Loudspeaker' },
	{ key: 'wired-audio', label: 'Wired audio (headphone socket)', needs: 'headphone-socket' },
	{ key: 'wired-charging', label: 'Wired charging' },
	{ key: 'usb-data', label: 'USB data (seen by a computer)' },
	{ key: 'wireless-charging', label: 'Wireless charging', needs: 'wireless-charging' },
	{ key: 'buttons', label: 'Buttons' },
	{ key: 'vibration', label: 'Vibration' },
	{ key: 'sim', label: 'SIM detected' },
	{ key: 'cellular', label: 'Cellular service' },
	{ key: 'wifi', label: 'Wi-Fi' },
	{ key: 'bluetooth', label: 'Bluetooth' },
	{ key: 'nfc', label: 'NFC', needs: 'nfc' },
	{ key: 'positioning', label: 'Satellite positioning' },
	// Common practice, no published source: a night on standby shows a leak a short test misses.
	{ key: 'standby-drain', label: 'Overnight standby drain', afterOnly: true },
	{ key: 'liquid-indicators', label: 'Liquid contact indicators checked after the repair', afterOnly: true }
];

export type FunctionTestPhase = 'before' | 'after';

/**
 * The items asked of a device. `capabilities` null means the model declares nothing: every item.
 * 'before' (at intake) leaves out the after-only items.
 */
export function functionTestsFor(
	capabilities: readonly string[] | null | undefined,
	phase: FunctionTestPhase = 'after'
): FunctionTestDef[] {
	const has = capabilities ? new Set(capabilities) : null;
	return FUNCTION_TESTS.filter(
		(t) => (phase === 'after' || !t.afterOnly) && (!t.needs || !has || has.has(t.needs))
	);
}

export const functionResults = ['pass', 'fail', 'not-tested'] as const;
export type FunctionResultValue = (typeof functionResults)[number];

/** The pre-repair words: "works" reads better at the counter than "pass". */
export const beforeLabels: Record<FunctionResultValue, string> = {
	pass: 'Works',
	fail: 'Does not work',
	'not-tested': 'Not tested'
};
export const afterLabels: Record<FunctionResultValue, string> = {
	pass: 'Pass',
	fail: 'Fail',
	'not-tested': 'Not tested'
};

export const COULD_NOT_POWER_ON = 'Could not power on';

/** The pre-repair test as stored on the job. */
export type PreRepairTest = {
	couldNotPowerOn: boolean;
	items: { key: string; label: string; result: FunctionResultValue; note: string }[];
	at: string;
	by: string | null;
};
