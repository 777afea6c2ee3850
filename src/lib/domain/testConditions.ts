/**
 * The conditions under which IEC 60529 tests a rating, as asked at the counter. The immersion tests
 * (second digits 7 and 8) use fresh water within 5 K of the specimen's temperature, with the specimen
 * at rest (IEC 60529, the second-digit 7 and 8 immersion tests; clause number from memory, not
 * given — see docs/trade-reference.md §1 and §9). So hot or warm water, soapy, salty, chlorinated or
 * sugary liquid, moving water and jets are all outside what a 7 or 8 says.
 *
 * The counter cannot measure the water: the technician picks a band. "Warm" and "hot" are defined
 * as clearly warmer than the phone (a bath, a hot tub, a hot drink), i.e. more than the 5 K the test
 * allows — our design choice. Very cold water also differs by more than 5 K from a phone at room
 * temperature; the "cold or room" band accepts that imprecision to keep intake quick.
 */
import { liquidWords, type LiquidKind } from './liquid';

export const liquidTemperatures = ['room', 'warm', 'hot'] as const;
export type LiquidTemperature = (typeof liquidTemperatures)[number];

export const waterMotions = ['still', 'moving', 'jet'] as const;
export type WaterMotion = (typeof waterMotions)[number];

/** Findings about the test conditions; each is also an `ExposureReason`. */
export type ConditionReason = 'liquid' | 'temperature' | 'motion' | 'detergent';

/** The sentence that says which test conditions a rating stands for. */
export const IMMERSION_CONDITIONS =
	'IEC 60529’s immersion tests (second digit 7 and 8; clause from memory) use fresh water within 5 K of the phone’s temperature, with the phone at rest';

export interface ConditionInput {
	liquid: LiquidKind;
	/** Undefined: not asked (jobs taken in before the question existed). */
	temperature?: LiquidTemperature;
	motion?: WaterMotion;
	soapy?: boolean;
}

export interface ConditionFindings {
	reasons: ConditionReason[];
	/** What was outside the test conditions, in words; empty when nothing was. */
	words: string[];
	/** "still fresh water near the phone's temperature", as far as it was asked. */
	inside: string;
}

/**
 * Which of the immersion test's conditions the exposure broke. `motion` is left out for splashes:
 * there the question is whether the rating includes a jet test (digits 5/6), not whether it was still.
 */
export function conditionFindings(exposure: ConditionInput, includeMotion: boolean): ConditionFindings {
	const reasons: ConditionReason[] = [];
	const words: string[] = [];
	if (exposure.liquid !== 'fresh') {
		reasons.push('liquid');
		words.push(`the liquid was ${liquidWords[exposure.liquid]}, not fresh water`);
	} else if (exposure.soapy) {
		reasons.push('detergent');
		words.push(
			'the water had soap or detergent in it, which lowers its surface tension so it creeps through gaps that fresh water does not'
		);
	}
	if (exposure.temperature === 'warm' || exposure.temperature === 'hot') {
		reasons.push('temperature');
		words.push(
			exposure.temperature === 'hot'
				? 'the liquid was hot, far more than 5 K warmer than the phone; heat also softens the adhesive that seals the phone (common practice, no published source)'
				: 'the water was warm, more than 5 K warmer than the phone'
		);
	}
	if (includeMotion && (exposure.motion === 'moving' || exposure.motion === 'jet')) {
		reasons.push('motion');
		words.push(
			exposure.motion === 'jet'
				? 'it was under a jet or running water, and digits 7 and 8 do not include the jet tests (digits 5 and 6)'
				: 'the water was moving (swimming, waves, a washing machine), which presses harder on the seals than still water at the same depth'
		);
	}
	const inside = [
		includeMotion && exposure.motion === 'still' ? 'still' : '',
		exposure.liquid === 'fresh' ? 'fresh water' : '',
		exposure.temperature === 'room' ? 'near the phone’s temperature' : ''
	]
		.filter(Boolean)
		.join(' ');
	return { reasons, words, inside };
}
