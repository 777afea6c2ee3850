import { describe, expect, it } from 'vitest';
import { currencyDigits, formatAmountInput, parseAmount, parseLines } from './input';

// Decimal places per currency are ISO 4217's minor units (EUR 2, JPY 0, BHD 3), as Intl reports them.
describe('typed amounts to minor units', () => {
	it('reads major units exactly, without floats', () => {
		expect(currencyDigits('EUR')).toBe(2);
		expect(currencyDigits('JPY')).toBe(0);
		expect(currencyDigits('BHD')).toBe(3);
		expect(parseAmount('49.50', 'EUR')).toEqual({ ok: true, value: 4950 });
		expect(parseAmount('49,5', 'EUR')).toEqual({ ok: true, value: 4950 });
		expect(parseAmount('0.29', 'EUR')).toEqual({ ok: true, value: 29 }); // 0.29 * 100 = 28.999… as a float
		expect(parseAmount('1 200', 'JPY')).toEqual({ ok: true, value: 1200 });
		expect(parseAmount('1.234', 'BHD')).toEqual({ ok: true, value: 1234 });
	});

	it('refuses negative, malformed, over-precise and absurd amounts with a reason', () => {
		expect(parseAmount('-5', 'EUR')).toEqual({ ok: false, error: 'A price cannot be negative.' });
		expect(parseAmount('abc', 'EUR').ok).toBe(false);
		expect(parseAmount('1e3', 'EUR').ok).toBe(false);
		expect(parseAmount('1.005', 'EUR')).toEqual({ ok: false, error: 'At most 2 decimals.' });
		expect(parseAmount('5.5', 'JPY')).toEqual({ ok: false, error: 'JPY has no decimals.' });
		// MAX_MINOR is 10,000,000 minor units (100,000.00): one unit more is refused.
		expect(parseAmount('100000.00', 'EUR')).toEqual({ ok: true, value: 10_000_000 });
		expect(parseAmount('100000.01', 'EUR').ok).toBe(false);
	});

	it('round-trips a stored amount for editing', () => {
		expect(formatAmountInput(4950, 'EUR')).toBe('49.50');
		expect(formatAmountInput(5, 'EUR')).toBe('0.05');
		expect(formatAmountInput(1200, 'JPY')).toBe('1200');
	});
});

describe('quote lines from the form', () => {
	const row = (over = {}) => ({ description: 'Diagnosis', kind: 'fee', quantity: '1', unit: '49', ...over });

	it('turns complete rows into lines and skips blank ones', () => {
		expect(parseLines([row(), { description: '', kind: 'parts', quantity: '1', unit: '' }], 'EUR')).toEqual({
			ok: true,
			lines: [{ description: 'Diagnosis', kind: 'fee', quantity: 1, unitMinor: 4900 }]
		});
	});

	it('reports each problem on its own row and field', () => {
		const result = parseLines(
			[
				row(),
				{ description: '', kind: 'parts', quantity: '1', unit: '' },
				row({ quantity: '0', unit: '-1' })
			],
			'EUR'
		);
		expect(result).toEqual({
			ok: false,
			errors: { 2: { quantity: 'A whole number, 1 or more.', unit: 'A price cannot be negative.' } }
		});
		expect(parseLines([row({ quantity: '1000', unit: '100000' })], 'EUR')).toMatchObject({
			ok: false,
			errors: { 0: { unit: 'This line’s total is beyond any phone repair; check it.' } }
		});
		expect(parseLines([], 'EUR')).toMatchObject({ ok: false, form: 'Add at least one line.' });
	});
});
