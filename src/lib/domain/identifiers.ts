/**
 * Device identifiers taken at intake.
 *
 * An IMEI is 15 digits: an 8-digit type allocation code, a 6-digit serial and one check digit.
 * The check digit is the Luhn digit (ISO/IEC 7812-1) over the first 14 digits, as set out in
 * 3GPP TS 23.003 Annex B. Checking it at the counter catches most typos (every single wrong digit
 * and most swaps of neighbours) before a job is filed under the wrong phone.
 */

/** Spaces and dashes are how people group the digits when they read them off a tray or a box. */
const SEPARATORS = /[\s-]/g;

/** Strips the separators people type; does not validate. */
export function normaliseImei(value: string): string {
	return value.replace(SEPARATORS, '');
}

/**
 * Luhn sum of `digits` where the rightmost digit is doubled when `doubleRightmost` is true.
 * Computing the check digit doubles the rightmost body digit (the check digit is not there yet);
 * validating a full number leaves the rightmost (check) digit as it is.
 */
function luhnSum(digits: string, doubleRightmost: boolean): number {
	let sum = 0;
	let double = doubleRightmost;
	for (let i = digits.length - 1; i >= 0; i--) {
		const d = digits.charCodeAt(i) - 48;
		if (double) {
			const twice = d * 2;
			// The digit sum of a doubled digit: 2·d for d < 5, 2·d − 9 above (e.g. 14 → 1 + 4 = 5).
			sum += twice > 9 ? twice - 9 : twice;
		} else {
			sum += d;
		}
		double = !double;
	}
	return sum;
}

/** The Luhn check digit to append to a body of one or more ASCII digits (no separators). */
export function luhnCheckDigit(body: string): number {
	if (typeof body !== 'string' || !/^\d+$/.test(body)) {
		throw new RangeError(`Luhn body must be one or more digits (got "${String(body)}")`);
	}
	return (10 - (luhnSum(body, true) % 10)) % 10;
}

/**
 * The check digit for a 14-digit IMEI body (spaces and dashes allowed).
 * Throws for anything else, so a caller cannot mistake bad input for a digit.
 */
export function imeiCheckDigit(first14: string): number {
	if (typeof first14 !== 'string') throw new TypeError('IMEI body must be a string of 14 digits');
	const body = normaliseImei(first14);
	if (!/^\d{14}$/.test(body)) {
		throw new RangeError(`IMEI body must be exactly 14 digits (got "${first14}")`);
	}
	return luhnCheckDigit(body);
}

/** True when `value` is 15 digits (after removing spaces and dashes) with a correct Luhn check digit. */
export function isValidImei(value: string): boolean {
	if (typeof value !== 'string') return false;
	const digits = normaliseImei(value);
	if (!/^\d{15}$/.test(digits)) return false;
	return luhnSum(digits, false) % 10 === 0;
}
