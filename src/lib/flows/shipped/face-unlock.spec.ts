/**
 * Issue 11 fixes in flows/face-unlock-after-liquid.flow.yaml (version 2). Each test fails on
 * version 1: run with SHIPPED_FLOWS_DIR pointing at a copy of it.
 */
import { describe, expect, it } from 'vitest';
import { flat, loadShipped, reachableAvoiding, walk } from './load';

const def = loadShipped('face-unlock-after-liquid');
const step = (id: string) => {
	expect(def.steps, `step ${id}`).toHaveProperty(id);
	return def.steps[id];
};
const DEPTH = 'depth-module-damaged';
/** Camera fine, no corrosion seen, no short: at the pin-by-pin comparison. */
const toCompare = [
	'Face unlock unavailable; front camera works',
	'All of them work',
	'Battery looks normal and is disconnected',
	'No corrosion seen',
	0.45
];
const toDepthCheck = [
	...toCompare,
	'Every pin reads like its reference',
	"Customer's front camera works; face unlock still unavailable",
	'Flex looks sound; face unlock still unavailable'
];

describe('face-unlock flow, version 2', () => {
	it('reaches the depth-module verdict only through a board-side line check and a check of its flex (point 9)', () => {
		expect(reachableAvoiding(def, def.start).has(DEPTH)).toBe(true);
		// Every path to the verdict passes both the pin-by-pin comparison and the depth module's own check.
		expect(reachableAvoiding(def, def.start, ['connector-compare']).has(DEPTH)).toBe(false);
		expect(reachableAvoiding(def, def.start, ['depth-lines-check']).has(DEPTH)).toBe(false);
		const check = flat(step('depth-lines-check'));
		expect(check).toMatch(/diode mode/);
		expect(check).toMatch(/known-good board/);
		expect(check).toMatch(/continuity/);
		expect(walk(def, toDepthCheck)).toBe('depth-lines-check');
	});

	it('sends an open or leaking line found at that check to its own board-level verdict, not to the depth module (point 9)', () => {
		const open = step(walk(def, [...toDepthCheck, 'A board-side line is open']));
		const leak = step(walk(def, [...toDepthCheck, 'A board-side line leaks']));
		expect(open.kind === 'verdict' && open.verdict.code).toBe('front-line-open');
		expect(leak.kind === 'verdict' && leak.verdict.code).toBe('front-line-leakage');
		for (const s of [open, leak]) expect(s.kind === 'verdict' && s.verdict.severity).toBe('board-level');
	});

	it('says in the remaining risks that the depth-module verdict was reached by elimination (point 9)', () => {
		const end = walk(def, [
			...toDepthCheck,
			'Board side and flex test good; nothing found on the module side either'
		]);
		expect(end).toBe(DEPTH);
		const depth = step(DEPTH);
		expect(depth.kind === 'verdict' && depth.verdict.risks).toMatch(/elimination/);
	});

	it('tells a short, partial leakage and an open line apart in diode mode (point 7)', () => {
		const before = toCompare.slice(0, -1);
		expect(walk(def, [...before, 0.01])).toBe('front-line-short');
		expect(walk(def, [...before, 3])).toBe('connector-compare');
		expect(walk(def, [...toCompare, 'A pin shows OL where its reference reads (open line)'])).toBe(
			'front-line-open'
		);
		expect(
			walk(def, [
				...toCompare,
				'A pin reads clearly lower than its reference (leakage)',
				'Still reads lower than its reference'
			])
		).toBe('front-line-leakage');
		expect(flat(step('connector-compare'))).toMatch(/every pin of the depth module's connector/);
	});

	it('keeps its remaining risks honest: liquid near the front sensors may have reached the depth module (trade reference §8)', () => {
		for (const id of [
			'front-flex-replace',
			'front-flex-transfer',
			'front-camera-replace',
			'front-line-short'
		]) {
			const s = step(id);
			expect(s.kind === 'verdict' && s.verdict.risks, id).toMatch(/depth module/);
		}
	});

	it('makes moving paired parts to a new flex board-level and a flex that fits as it comes a module swap (point 11)', () => {
		const flexBad = [...toDepthCheck.slice(0, -1), 'Face unlock available with the known-good flex'];
		const swap = step(walk(def, [...flexBad, 'Not paired; the new flex works as it comes']));
		const move = step(walk(def, [...flexBad, 'Paired; the parts must move to the new flex']));
		expect(swap.kind === 'verdict' && swap.verdict.severity).toBe('replace');
		expect(move.kind === 'verdict' && move.verdict.severity).toBe('board-level');
	});
});
