import { liquidWords, type LiquidKind } from './liquid';

export type UrgencyLevel = 'low' | 'elevated' | 'high' | 'critical';

/**
 * How soon the board should be opened and cleaned. COMMON PRACTICE, NO PUBLISHED SOURCE: salt and
 * sugary liquids corrode fastest, chlorinated and unknown liquids next, fresh water slowest; every
 * hour the phone waits (worse still if it is powered) adds corrosion. The weights and hour bands below
 * are our own rule of thumb, not measured rates. `null` hours means the customer does not know.
 */
export function urgencyHint(
	hoursSinceExposure: number | null,
	liquid: LiquidKind
): { level: UrgencyLevel; text: string } {
	if (hoursSinceExposure !== null && !(Number.isFinite(hoursSinceExposure) && hoursSinceExposure >= 0)) {
		throw new RangeError(
			`hoursSinceExposure must be a finite number ≥ 0 or null (got ${hoursSinceExposure})`
		);
	}
	const liquidWeight = liquid === 'fresh' ? 0 : liquid === 'salt' || liquid === 'sugary' ? 2 : 1;
	const h = hoursSinceExposure;
	const waitBand = h === null ? 1 : h < 6 ? 0 : h < 24 ? 1 : h < 72 ? 2 : 3;
	const levels: UrgencyLevel[] = ['low', 'elevated', 'high', 'critical'];
	const level = levels[Math.min(3, liquidWeight + waitBand)];
	const when = h === null ? 'an unknown time ago' : `${Number(h.toFixed(1))} h ago`;
	const advice =
		level === 'low'
			? 'Open and clean it today.'
			: level === 'elevated'
				? 'Open and clean it soon, ahead of routine jobs.'
				: 'Open and clean it now, before other work.';
	return {
		level,
		text: `${liquidWords[liquid][0].toUpperCase()}${liquidWords[liquid].slice(1)}, ${when}: ${level} urgency. Disconnect the battery first. ${advice} (Common practice, no published source: salt and sugary liquids corrode fastest, and every hour of waiting makes it worse.)`
	};
}
