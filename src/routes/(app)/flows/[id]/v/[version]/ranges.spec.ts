import { describe, expect, it } from 'vitest';
import { rangeText } from './ranges';

// Semantics from the flow format (issue 3 §1): min inclusive, max exclusive, a missing bound is open.
describe('rangeText', () => {
	it('words each kind of band', () => {
		expect(rangeText(undefined, 0.01, 'A')).toBe('under 0.01 A');
		expect(rangeText(0.01, 0.5, 'A')).toBe('0.01 to under 0.5 A');
		expect(rangeText(0.5, undefined, 'A')).toBe('0.5 A or more');
		expect(rangeText(undefined, undefined, 'V')).toBe('any reading');
	});
	it('treats a domain as inclusive at both ends', () => {
		expect(rangeText(0, 5, 'V', true)).toBe('0 to 5 V');
		expect(rangeText(undefined, 5, 'V', true)).toBe('up to 5 V');
	});
});
