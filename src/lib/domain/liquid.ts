/** The liquid a phone met, as asked at intake; IP tests (IEC 60529) use fresh water only. */
export const liquidKinds = ['fresh', 'salt', 'chlorinated', 'sugary', 'other', 'unknown'] as const;
export type LiquidKind = (typeof liquidKinds)[number];

/** Plain words for explanations ("The liquid was salt water"). */
export const liquidWords: Record<LiquidKind, string> = {
	fresh: 'fresh water',
	salt: 'salt water',
	chlorinated: 'chlorinated water',
	sugary: 'a sugary drink',
	other: 'a liquid other than fresh water',
	unknown: 'an unknown liquid'
};
