import fc from 'fast-check';
import fastLuhn from 'fast-luhn';
import * as luhn from 'luhn';
import { describe, expect, it } from 'vitest';
import { imeiCheckDigit, isValidImei, luhnCheckDigit, normaliseImei } from './identifiers';

const digitString = (length: number) =>
	fc.array(fc.integer({ min: 0, max: 9 }), { minLength: length, maxLength: length }).map((d) => d.join(''));

describe('imeiCheckDigit — reference vectors', () => {
	it('3GPP TS 23.003 Annex B worked example: 26053179311383 → 7 (computed from the published doubling steps)', () => {
		// Doubled digits 6,5,1,9,1,3,3 → 12,10,2,18,2,6,6 → digit sum 29; others 2,0,3,7,3,1,8 → 24;
		// 29 + 24 = 53, next multiple of ten is 60, so the check digit is 7.
		expect(imeiCheckDigit('26053179311383')).toBe(7);
		expect(isValidImei('260531793113837')).toBe(true);
	});

	it('trade-reference §2 vectors (computed): 35780502398494 → 2, 49015420323751 → 8', () => {
		expect(imeiCheckDigit('35780502398494')).toBe(2);
		expect(imeiCheckDigit('49015420323751')).toBe(8);
		expect(isValidImei('357805023984942')).toBe(true);
		expect(isValidImei('490154203237518')).toBe(true);
	});

	it('plain Luhn (ISO/IEC 7812-1) 7992739871 → 3 (trade-reference §2, computed)', () => {
		expect(luhnCheckDigit('7992739871')).toBe(3);
		// npm `luhn` and `fast-luhn` agree that the completed number is valid.
		expect(luhn.validate('79927398713')).toBe(true);
		expect(fastLuhn('79927398713')).toBe(true);
	});
});

describe('imeiCheckDigit — input handling', () => {
	it('ignores spaces and dashes in the body', () => {
		expect(imeiCheckDigit('26 053179 311383')).toBe(7);
		expect(imeiCheckDigit('26-053179-311383')).toBe(7);
	});

	it.each(['', '2605317931138', '260531793113837', '2605317931138X', '２６053179311383', '26.053179311383'])(
		'throws a clear RangeError for %j',
		(bad) => {
			expect(() => imeiCheckDigit(bad)).toThrow(RangeError);
			expect(() => imeiCheckDigit(bad)).toThrow(/exactly 14 digits/);
		}
	);

	it('throws a TypeError for a non-string', () => {
		expect(() => imeiCheckDigit(26053179311383 as unknown as string)).toThrow(TypeError);
	});

	it('luhnCheckDigit refuses an empty or non-digit body', () => {
		expect(() => luhnCheckDigit('')).toThrow(RangeError);
		expect(() => luhnCheckDigit('12 34')).toThrow(RangeError);
	});
});

describe('isValidImei', () => {
	it('accepts the number with spaces or dashes as people write it', () => {
		expect(isValidImei('49-015420-323751-8')).toBe(true);
		expect(isValidImei(' 35 780502 398494 2 ')).toBe(true);
	});

	it.each([
		['wrong check digit', '490154203237519'],
		['14 digits', '49015420323751'],
		['16 digits', '4901542032375180'],
		['letters', '49015420323751A'],
		['empty', ''],
		['other separators', '490154.203237518'],
		['full-width digits', '４90154203237518']
	])('rejects %s', (_label, value) => {
		expect(isValidImei(value)).toBe(false);
	});

	it('rejects non-strings instead of throwing', () => {
		expect(isValidImei(490154203237518 as unknown as string)).toBe(false);
		expect(isValidImei(null as unknown as string)).toBe(false);
	});

	it('treats all zeros as Luhn-valid, as `fast-luhn` does (`luhn` rejects it — its own quirk)', () => {
		expect(isValidImei('000000000000000')).toBe(true);
		expect(fastLuhn('000000000000000')).toBe(true);
		expect(luhn.validate('000000000000000')).toBe(false);
	});

	it('normaliseImei strips only spaces and dashes', () => {
		expect(normaliseImei(' 49-015420 323751-8 ')).toBe('490154203237518');
		expect(normaliseImei('49.01')).toBe('49.01');
	});
});

describe('cross-check with npm `luhn` and `fast-luhn` on random bodies (fast-check)', () => {
	it('the computed digit completes a number that both libraries validate', () => {
		fc.assert(
			fc.property(digitString(14), (body) => {
				const full = body + imeiCheckDigit(body);
				expect(isValidImei(full)).toBe(true);
				expect(fastLuhn(full)).toBe(true);
				// `luhn` rejects the all-zero number although its Luhn sum is 0.
				expect(luhn.validate(full)).toBe(!/^0+$/.test(full));
			}),
			{ numRuns: 2000 }
		);
	});

	it('isValidImei agrees with fast-luhn on any 15 digits, and with luhn except all zeros', () => {
		fc.assert(
			fc.property(digitString(15), (value) => {
				expect(isValidImei(value)).toBe(fastLuhn(value));
				if (!/^0+$/.test(value)) expect(isValidImei(value)).toBe(luhn.validate(value));
			}),
			{ numRuns: 5000 }
		);
	});

	it('every other check digit is rejected by us and by both libraries', () => {
		fc.assert(
			fc.property(digitString(14), fc.integer({ min: 1, max: 9 }), (body, shift) => {
				const wrong = body + ((imeiCheckDigit(body) + shift) % 10);
				expect(isValidImei(wrong)).toBe(false);
				expect(fastLuhn(wrong)).toBe(false);
				expect(luhn.validate(wrong)).toBe(false);
			}),
			{ numRuns: 2000 }
		);
	});

	it('luhnCheckDigit matches the libraries for bodies of other lengths', () => {
		fc.assert(
			fc.property(fc.integer({ min: 1, max: 30 }).chain(digitString), (body) => {
				expect(fastLuhn(body + luhnCheckDigit(body))).toBe(true);
			}),
			{ numRuns: 1000 }
		);
	});

	it('catches every single-digit typo (a property of Luhn, ISO/IEC 7812-1)', () => {
		fc.assert(
			fc.property(
				digitString(14),
				fc.integer({ min: 0, max: 14 }),
				fc.integer({ min: 1, max: 9 }),
				(body, at, shift) => {
					const full = body + imeiCheckDigit(body);
					const typo = full.slice(0, at) + ((Number(full[at]) + shift) % 10) + full.slice(at + 1);
					expect(isValidImei(typo)).toBe(false);
				}
			),
			{ numRuns: 2000 }
		);
	});
});
