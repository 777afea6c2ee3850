import { describe, expect, it } from 'vitest';
import { opensPhone, WATER_RESISTANCE_NOTE } from './water-resistance';

describe('opensPhone', () => {
	it('is true for a verdict whose repair opens the phone', () => {
		for (const s of ['repair', 'replace', 'board-level'] as const) expect(opensPhone(s, []), s).toBe(true);
	});

	it('is false with no repair: no fault, uneconomic, no verdict, a diagnostic fee alone', () => {
		expect(opensPhone('no-fault', [])).toBe(false);
		expect(opensPhone('uneconomic', [{ kind: 'fee' }])).toBe(false);
		expect(opensPhone(null, [])).toBe(false);
	});

	it('is true when the quote proposes parts or labour', () => {
		expect(opensPhone(null, [{ kind: 'fee' }, { kind: 'labour' }])).toBe(true);
		expect(opensPhone('no-fault', [{ kind: 'parts' }])).toBe(true);
	});

	it('names adhesive and seals', () => {
		expect(WATER_RESISTANCE_NOTE).toMatch(
			/water resistance is no longer assured unless new adhesive and seals/
		);
	});
});
