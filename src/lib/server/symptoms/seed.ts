import { parse } from 'yaml';

/**
 * The catalogue a new shop starts with: what a liquid-damage bench sees at the counter, grouped as
 * a technician looks for it. Codes that the shipped flows use as `symptoms` tags are here with a
 * written label; the rest are presentations with no flow yet. Sort orders leave gaps of 10 so a
 * senior can slot a symptom between two others.
 */
export const SEED_GROUPS: { group: string; symptoms: [code: string, label: string][] }[] = [
	{
		group: 'Power and start',
		symptoms: [
			['no-power', 'No power'],
			['no-boot', 'Does not start (logo or black screen)'],
			['restart-loop', 'Restart loop'],
			['recovery-screen', 'Stuck on the recovery screen'],
			['battery-drain', 'Battery drains fast'],
			['runs-hot', 'Runs hot'],
			['not-charging', 'Not charging'],
			['wireless-charging', 'Wireless charging fails']
		]
	},
	{
		group: 'Display and touch',
		symptoms: [
			['no-picture', 'No picture'],
			['no-backlight', 'No backlight (picture very dark)'],
			['display-stains', 'Stains, lines or dead pixels on the display'],
			['touch-fault', 'Touch does not respond'],
			['ghost-touch', 'Touches by itself']
		]
	},
	{
		group: 'Sound and voice',
		symptoms: [
			['no-sound', 'No sound from the loudspeaker'],
			['earpiece', 'Caller hard to hear (earpiece)'],
			['microphone-fault', 'Microphone fault (others cannot hear)'],
			['vibration', 'No vibration']
		]
	},
	{
		group: 'Cameras and sensors',
		symptoms: [
			['rear-camera', 'Rear camera fault'],
			['camera-fogging', 'Fog inside a camera'],
			['front-camera', 'Front camera fault'],
			['flash-torch', 'Flash or torch does not light'],
			['face-unlock', 'Face unlock fails'],
			['fingerprint-fault', 'Fingerprint or biometric button fault'],
			['proximity-sensor', 'Screen stays on during calls (proximity sensor)']
		]
	},
	{
		group: 'Connectivity',
		symptoms: [
			['no-service', 'No service'],
			['sim-not-detected', 'SIM not detected'],
			['wifi-fault', 'Wi-Fi greyed out or weak'],
			['bluetooth-fault', 'Bluetooth greyed out or weak'],
			['nfc-fault', 'Contactless (NFC) does not work']
		]
	},
	{
		group: 'Buttons and body',
		symptoms: [
			['buttons-stuck', 'Buttons stuck'],
			['buttons-pressing', 'Buttons press by themselves'],
			['corrosion-found', 'Corrosion found on inspection']
		]
	},
	{
		group: 'Care',
		symptoms: [
			['fresh-liquid', 'Freshly wet: first aid'],
			['data-recovery', 'Data recovery only']
		]
	}
];

export const OTHER_GROUP = 'Other';
/** Sort orders of the "Other" group start here, after every seeded group. */
export const OTHER_SORT = 9000;

export type SeedRow = { code: string; label: string; group: string; sortOrder: number };

export function seedRows(): SeedRow[] {
	return SEED_GROUPS.flatMap((g, gi) =>
		g.symptoms.map(([code, label], si) => ({
			code,
			label,
			group: g.group,
			sortOrder: (gi + 1) * 100 + si * 10
		}))
	);
}

/**
 * Every `symptoms` tag of the flow files in flows/. The files are embedded at build time (like the
 * migrations), so `node build` needs no flows folder at run time.
 */
const files = import.meta.glob<string>('/flows/*.flow.yaml', {
	eager: true,
	query: '?raw',
	import: 'default'
});

export function flowFileTags(): string[] {
	const tags = new Set<string>();
	for (const [name, text] of Object.entries(files)) {
		try {
			const doc = parse(text, { maxAliasCount: 50 }) as { symptoms?: unknown } | null;
			if (Array.isArray(doc?.symptoms)) {
				for (const tag of doc.symptoms) if (typeof tag === 'string') tags.add(tag);
			}
		} catch (e) {
			// A broken flow file is the flows checker's business; the catalogue keeps the other tags.
			console.error(`[symptoms] could not read symptoms from ${name}:`, e);
		}
	}
	return [...tags].sort();
}
