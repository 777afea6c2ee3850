/**
 * Issue 11 fixes in flows/no-sound-after-liquid.flow.yaml (version 2). Each test fails on
 * version 1: run with SHIPPED_FLOWS_DIR pointing at a copy of it.
 */
import { describe, expect, it } from 'vitest';
import { exitsOf } from '../schema';
import { flat, loadShipped, reachableAvoiding, walk } from './load';

const def = loadShipped('no-sound-after-liquid');
const step = (id: string) => {
	expect(def.steps, `step ${id}`).toHaveProperty(id);
	return def.steps[id];
};
const SILENT = 'Everything audio is silent';
/** Steps and verdicts that judge a loudspeaker or earpiece. */
const SPEAKER = ['speaker-out', 'coil-resistance', 'speaker-contacts', 'speaker-replace'];

describe('no-sound flow, version 2', () => {
	it('checks first whether the phone believes an accessory is connected when everything is silent (point 10)', () => {
		expect(walk(def, [SILENT])).toBe('accessory-check');
		const check = flat(step('accessory-check'));
		expect(check).toMatch(/headset or accessory/);
		expect(check).toMatch(/port/);
		// Liquid in the port: clean and dry it, then look at the audio route again.
		const clean = walk(def, [SILENT, 'It shows a headset or accessory, or a port is wet or dirty']);
		expect(clean).toBe('port-clean');
		expect(flat(step(clean))).toMatch(/audio route/);
		expect(flat(step(clean))).toMatch(/isopropyl alcohol of 99 % or more/);
		const cleaned = step(
			walk(def, [
				SILENT,
				'It shows a headset or accessory, or a port is wet or dirty',
				'No accessory shown now and the sound is back'
			])
		);
		expect(cleaned.kind === 'verdict' && cleaned.verdict.code).toBe('port-cleaned');
	});

	it('reaches no speaker step from "everything is silent" except through the accessory check and the audio circuit (point 10)', () => {
		const basics = step('audio-basics');
		const silent = basics.kind === 'test' ? basics.outcomes!.find((o) => o.label === SILENT)! : undefined;
		expect(silent).toBeDefined();
		const fromSilent = reachableAvoiding(def, silent!.next, ['accessory-check']);
		expect(fromSilent.size).toBe(0);
		const pastAccessory = reachableAvoiding(def, 'accessory-check', ['audio-area-inspect']);
		for (const id of SPEAKER) expect(pastAccessory.has(id), id).toBe(false);
		// ...and the audio circuit step comes before the speaker, not instead of it.
		expect(reachableAvoiding(def, 'audio-area-inspect').has('speaker-replace')).toBe(true);
	});

	it('checks the audio circuit — amplifier and codec supplies, corrosion near them — before any speaker (point 10)', () => {
		const inspect = step('audio-area-inspect');
		const text = flat(inspect);
		expect(text).toMatch(/amplifier/);
		expect(text).toMatch(/codec/);
		expect(text).toMatch(/supplies/);
		expect(text).toMatch(/corrosion/);
		expect(inspect.provenance).toEqual(expect.arrayContaining([expect.objectContaining({ basis: 'maker' })]));
		expect(exitsOf(inspect)).toEqual(['audio-clean', 'audio-circuit', 'speaker-out']);
	});

	it('picks out the microphones with front- and rear-camera videos played back, not a voice memo (point 10)', () => {
		const basics = flat(step('audio-basics'));
		expect(basics).toMatch(/rear camera/);
		expect(basics).toMatch(/front camera/);
		expect(basics).toMatch(/play both back/);
		expect(basics).toMatch(/different microphone/);
		for (const [id, s] of Object.entries(def.steps)) expect(flat(s), id).not.toMatch(/voice memo/i);
		for (const id of ['mic-mesh', 'dry-mic', 'mic-isolate'])
			expect(flat(step(id)), id).toMatch(/camera video/);
	});

	it('keeps microphones, open-port sensors and the cell out of an ultrasonic bath and shields off first (point 8)', () => {
		const clean = step('audio-clean');
		const text = flat(clean);
		for (const word of [
			/ultrasonic/,
			/shield lids off/,
			/no microphone/,
			/sensor with an open port/,
			/never the cell/
		])
			expect(text).toMatch(word);
		expect(clean.cautions).toContain('ultrasonic');
	});

	it('dries the board before ball-grid work with J-STD-033 times, preheats, removes underfill and shields neighbours (point 8)', () => {
		const text = flat(step('audio-circuit'));
		// IPC/JEDEC J-STD-033: 125 °C, parts ≤ 1.4 mm, saturated — 2a 5 h, 3 9 h, 4 11 h, 5 12 h, 5a 16 h.
		expect(text).toMatch(/dry the wet board out first/);
		expect(text).toMatch(
			/125 °C, parts up to 1\.4 mm thick: MSL 2a 5 h, MSL 3 9 h, MSL 4 11 h, MSL 5 12 h, MSL 5a 16 h/
		);
		for (const word of [/preheat/, /underfill/, /shield the neighbouring parts/i]) expect(text).toMatch(word);
	});

	it('makes moving paired parts to a new microphone flex board-level and a flex that fits as it comes a module swap (point 11)', () => {
		const toFlex = [
			'A microphone is silent or muffled',
			'Opening clean and dry',
			'Battery looks normal and is disconnected',
			'Works only with the known-good flex'
		];
		const swap = step(walk(def, [...toFlex, 'Not paired; the new flex works as it comes']));
		const move = step(walk(def, [...toFlex, 'Paired; the parts must move to the new flex']));
		expect(swap.kind === 'verdict' && swap.verdict.severity).toBe('replace');
		expect(flat(swap)).not.toMatch(/move them|hot air|solder/i);
		expect(move.kind === 'verdict' && move.verdict.severity).toBe('board-level');
	});
});
