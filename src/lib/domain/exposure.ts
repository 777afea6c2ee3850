/**
 * Exposure triage at intake: was what the phone went through within what its IP rating was tested
 * for? IEC 60529 (as summarised in docs/trade-reference.md §1) fixes the tests:
 *
 * - second digit 7: temporary immersion, 1 m for 30 min, fresh water;
 * - second digit 8: continuous immersion on terms the maker declares, which must be harsher than 7
 *   (deeper than 1 m and/or longer than 30 min), e.g. "IP68, up to 6 m for 30 min";
 * - digits 7/8 do not imply the splash and jet tests (4–6) unless the code says both ("IP65/IP68");
 * - the immersion tests use fresh water within 5 K of the phone, the phone at rest (testConditions.ts);
 * - digit 9 is a high-pressure, high-temperature jet test, never an immersion rating.
 *
 * Our design choices, not the standard's: limits are inclusive; only fresh water counts as the test
 * liquid; soap, warm water, moving water and jets put an immersion outside the test conditions; a result of "within" never means "undamaged" — seals weaken with age, drops and earlier
 * opening (common practice), so the explanation says so.
 */
import { z } from 'zod';
import { parseIpCode, type IpCode } from './ipCode';
import { liquidKinds, liquidWords, type LiquidKind } from './liquid';
import {
	conditionFindings,
	IMMERSION_CONDITIONS,
	liquidTemperatures,
	waterMotions,
	type LiquidTemperature,
	type WaterMotion
} from './testConditions';

export { parseIpCode, type IpCode };
export { liquidKinds, liquidWords, type LiquidKind };
export { liquidTemperatures, waterMotions, type LiquidTemperature, type WaterMotion };
export { urgencyHint, type UrgencyLevel } from './urgency';

export const exposureStatuses = [
	'within',
	'exceeded',
	'outside-test-conditions',
	'undetermined',
	'invalid-rating'
] as const;
export type ExposureStatus = (typeof exposureStatuses)[number];

export const exposureReasons = [
	'depth',
	'duration',
	'liquid',
	'no-immersion-rating',
	'temperature',
	'motion',
	'detergent'
] as const;
export type ExposureReason = (typeof exposureReasons)[number];

/** The device's rated protection. `code: null` (or "none") means the maker claims none. */
export const ratingSchema = z.object({
	code: z
		.string()
		.trim()
		.max(40)
		.nullable()
		.refine((code) => code === null || parseIpCode(code) !== 'invalid', {
			message: 'Not an IP code — write it like IP67, IPX7 or IP65/IP68, or leave it empty'
		}),
	declaredDepthM: z.number().positive().max(1000).optional(),
	declaredMinutes: z.number().positive().max(100_000).optional()
});
export type DeviceRating = z.infer<typeof ratingSchema>;

/** What happened to the phone. Depth and minutes may be unknown (the customer is not sure). */
export const exposureSchema = z.object({
	liquid: z.enum(liquidKinds),
	submerged: z.boolean(),
	depthM: z.number().nonnegative().max(1000).optional(),
	minutes: z.number().nonnegative().max(1_000_000).optional(),
	/** Undefined on jobs taken in before intake asked; the assessment then says nothing about it. */
	temperature: z.enum(liquidTemperatures).optional(),
	motion: z.enum(waterMotions).optional(),
	soapy: z.boolean().optional()
});
export type Exposure = z.infer<typeof exposureSchema>;

export interface ExposureAssessment {
	status: ExposureStatus;
	reasons: ExposureReason[];
	explanation: string;
}

/** Said whenever a result could be read as "the phone is fine". */
const SEALS_CAVEAT =
	'A rating describes a new phone in a lab; age, drops and earlier opening weaken the seals (common practice), so inspect inside anyway.';

const num = (value: number) => String(Number(value.toFixed(2)));

/** The immersion test the rating stands for, or a reason why there is none to compare against. */
type Limits =
	| { kind: 'limits'; depthM: number; minutes: number; label: string }
	| { kind: 'none' }
	| { kind: 'invalid'; why: string }
	| { kind: 'undeclared'; code: string };

function immersionLimits(rating: DeviceRating, ip: IpCode | null): Limits {
	if (ip === null || ip.immersion === null) return { kind: 'none' };
	if (ip.immersion === 7)
		return { kind: 'limits', depthM: 1, minutes: 30, label: `${ip.code} (1 m for 30 min)` };
	const { declaredDepthM: depth, declaredMinutes: minutes } = rating;
	if (depth === undefined || minutes === undefined) return { kind: 'undeclared', code: ip.code };
	if (!(depth > 0 && minutes > 0 && Number.isFinite(depth) && Number.isFinite(minutes))) {
		return { kind: 'invalid', why: 'the declared depth and minutes must be positive numbers' };
	}
	if (depth <= 1 && minutes <= 30) {
		return {
			kind: 'invalid',
			why: `IP68 must be harsher than IP67's 1 m for 30 min, but the declaration is ${num(depth)} m for ${num(minutes)} min`
		};
	}
	return {
		kind: 'limits',
		depthM: depth,
		minutes,
		label: `${ip.code} (${num(depth)} m for ${num(minutes)} min)`
	};
}

function checkExposureNumbers(exposure: Exposure): void {
	for (const [name, value] of [
		['depthM', exposure.depthM],
		['minutes', exposure.minutes]
	] as const) {
		if (value !== undefined && !(Number.isFinite(value) && value >= 0)) {
			throw new RangeError(`exposure.${name} must be a finite number ≥ 0 (got ${value})`);
		}
	}
}

/**
 * Compares an exposure with the device's rating. Precedence, most telling first: an invalid rating;
 * a broken limit ("exceeded", which holds whatever the conditions were); conditions outside the
 * immersion test's — not fresh water, soap, warmer than 5 K above the phone, moving water or a jet
 * ("outside-test-conditions"); missing numbers ("undetermined"); otherwise "within".
 * `reasons` lists every finding that applies, so "exceeded" in salt water also carries `liquid`.
 * A second digit 9 (IP69, IPX9) is a high-pressure, high-temperature jet test, never an immersion
 * rating (IEC 60529 amendment 2, 2013; via trade-reference §9).
 */
export function assessExposure(rating: DeviceRating, exposure: Exposure): ExposureAssessment {
	checkExposureNumbers(exposure);
	const ip = parseIpCode(rating.code);
	if (ip === 'invalid') {
		return {
			status: 'invalid-rating',
			reasons: [],
			explanation: `"${rating.code}" is not an IP code (expected something like IP67, IPX7 or IP65/IP68). Check the rating and enter it again.`
		};
	}
	const limits = immersionLimits(rating, ip);
	if (limits.kind === 'invalid') {
		return {
			status: 'invalid-rating',
			reasons: [],
			explanation: `The rating cannot be right: ${limits.why}.`
		};
	}

	if (!exposure.submerged) return assessSplash(ip, exposure);

	const conditions = conditionFindings(exposure, true);
	const outside: ExposureReason[] = conditions.reasons;
	const conditionNote = outside.length
		? ` Outside the test conditions: ${conditions.words.join('; ')}. ${IMMERSION_CONDITIONS}, so the rating says nothing about this.`
		: '';

	if (limits.kind === 'none') {
		const rated =
			ip === null
				? 'The phone has no IP rating'
				: ip.water.includes(9)
					? `${ip.code} has no immersion rating: second digit 9 is a high-pressure, high-temperature jet test (added by amendment 2, 2013), not an immersion test`
					: `${ip.code} has no immersion rating (second digit 7 or 8)`;
		return {
			status: 'exceeded',
			reasons: ['no-immersion-rating', ...outside],
			explanation: `${rated}, and it was submerged: expect liquid inside.${conditionNote}`
		};
	}
	if (limits.kind === 'undeclared') {
		const missing = `${limits.code} is only meaningful with the maker's declared depth and minutes, which are missing; look them up for this model.`;
		return outside.length === 0
			? { status: 'undetermined', reasons: [], explanation: missing }
			: { status: 'outside-test-conditions', reasons: outside, explanation: `${missing}${conditionNote}` };
	}

	const { depthM, minutes } = exposure;
	const over: ExposureReason[] = [];
	const words: string[] = [];
	if (depthM !== undefined && depthM > limits.depthM) {
		over.push('depth');
		words.push(`${num(depthM)} m is deeper than ${num(limits.depthM)} m`);
	}
	if (minutes !== undefined && minutes > limits.minutes) {
		over.push('duration');
		words.push(`${num(minutes)} min is longer than ${num(limits.minutes)} min`);
	}
	if (over.length > 0) {
		return {
			status: 'exceeded',
			reasons: [...over, ...outside],
			explanation: `Beyond the rated test of ${limits.label}: ${words.join(' and ')}. Expect liquid inside.${conditionNote}`
		};
	}
	if (outside.length > 0) {
		const compared =
			depthM !== undefined && minutes !== undefined
				? `Depth and time are within ${limits.label}.`
				: `Depth or time is not known, so it was not compared with ${limits.label}.`;
		return {
			status: 'outside-test-conditions',
			reasons: outside,
			explanation: `${compared}${conditionNote} Treat it as if the rating did not apply: open and inspect.`
		};
	}
	if (depthM === undefined || minutes === undefined) {
		const unknown = [depthM === undefined && 'depth', minutes === undefined && 'time']
			.filter(Boolean)
			.join(' and ');
		return {
			status: 'undetermined',
			reasons: [],
			explanation: `The ${unknown} under water is not known, so it cannot be compared with ${limits.label}. Ask the customer for a best guess.`
		};
	}
	return {
		status: 'within',
		reasons: [],
		explanation: `Within the rated test of ${limits.label}: ${num(depthM)} m for ${num(minutes)} min in ${conditions.inside}. ${SEALS_CAVEAT}`
	};
}

/**
 * Splashes and spills: immersion limits do not apply; digits 4–6 are the tests that come closest.
 * A spill needs a splash or jet digit (4–6); running water, a jet or waves need a jet digit (5–6).
 */
function assessSplash(ip: IpCode | null, exposure: Exposure): ExposureAssessment {
	const jetLike = exposure.motion === 'jet' || exposure.motion === 'moving';
	const lead = jetLike
		? 'Not submerged, but under running water, a jet or waves, so the immersion limits do not apply.'
		: 'Not submerged (a splash or spill), so the immersion limits do not apply.';
	const conditions = conditionFindings(exposure, false);
	if (conditions.reasons.length) {
		return {
			status: 'outside-test-conditions',
			reasons: conditions.reasons,
			explanation: `${lead} Outside the test conditions: ${conditions.words.join('; ')}. IEC 60529 tests with fresh water (for the immersion tests, within 5 K of the phone; clause from memory), so the rating says nothing about this. Open and inspect.`
		};
	}
	const testDigit = ip?.water.find((digit) => digit >= (jetLike ? 5 : 4) && digit <= 6);
	if (ip && testDigit !== undefined) {
		const test = testDigit === 4 ? 'a splash test' : 'a jet test';
		return {
			status: 'within',
			reasons: [],
			explanation: `${lead} ${ip.code} includes ${test} (second digit ${testDigit}) in fresh water. ${SEALS_CAVEAT}`
		};
	}
	const why =
		ip === null
			? 'The phone has no IP rating.'
			: ip.water.includes(9)
				? `${ip.code} names no splash or ordinary jet test (second digit 4 to 6); digit 9 is a different test, a high-pressure, high-temperature jet.`
				: ip.immersion !== null
					? `${ip.code} is an immersion rating; IEC 60529 does not say digits 7 and 8 cover splashes or jets.`
					: jetLike && ip.water.includes(4)
						? `${ip.code} includes only a splash test (second digit 4), not a jet test (5 or 6).`
						: `${ip.code} does not include a splash test (second digit 4 to 6).`;
	return { status: 'undetermined', reasons: [], explanation: `${lead} ${why} Open and inspect.` };
}
