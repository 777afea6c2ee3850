/**
 * The fixed caution vocabulary of flow steps. Each entry carries the words the run screen shows,
 * a one-line rule, and why the rule exists with its source (see docs trade-reference §7).
 */

export const CAUTION_CODES = [
	'battery',
	'hot-air',
	'solvent',
	'uv',
	'lead',
	'flux-fume',
	'esd',
	'sharp'
] as const;
export type CautionCode = (typeof CAUTION_CODES)[number];

export interface Caution {
	code: CautionCode;
	/** Short human name, e.g. for a badge. */
	words: string;
	/** One line the technician acts on. */
	rule: string;
	/** Why the rule exists, naming its source. */
	why: string;
}

/** Shown under every list of cautions: the shop's own rules come first. */
export const CAUTION_DEFERENCE =
	"These notes are reminders, not a safety programme: follow local codes and your shop's procedures.";

export const CAUTIONS: Record<CautionCode, Caution> = {
	battery: {
		code: 'battery',
		words: 'Lithium-ion battery',
		rule: 'Disconnect the battery before unplugging or heating anything; a bulging, hissing or leaking cell goes into the fire-resistant container.',
		why: 'Crushing, puncture or heat can start thermal runaway in a lithium-ion cell: fire and toxic gases including hydrogen fluoride (OSHA Safety and Health Information Bulletin, 2019). Disconnecting first is common practice.'
	},
	'hot-air': {
		code: 'hot-air',
		words: 'Hot air',
		rule: 'Battery out or disconnected and shielded; keep the nozzle moving and let the board cool before handling.',
		why: 'Heat is one of the triggers of lithium-ion thermal runaway (OSHA Safety and Health Information Bulletin, 2019). Nozzle and board stay hot enough to burn after the air stops (common practice, no published source).'
	},
	solvent: {
		code: 'solvent',
		words: 'Isopropyl alcohol',
		rule: 'No hot air, flame or sparks while it is wet; small amounts, ventilated bench, bottle closed.',
		why: 'Isopropyl alcohol has a flash point of 11.7 °C (53 °F) and its vapour burns in air between 2.0 % and 12.7 % (NIOSH Pocket Guide to Chemical Hazards).'
	},
	uv: {
		code: 'uv',
		words: 'UV lamp',
		rule: 'Wear UV-blocking eyewear and do not look into the lamp.',
		why: 'The eye does not flinch from UV-A, so it is harmed without warning; exposure limits per Directive 2006/25/EC and ICNIRP guidelines.'
	},
	lead: {
		code: 'lead',
		words: 'Leaded solder',
		rule: 'Wash hands before eating; keep food and drink off the bench.',
		why: 'Lead is toxic when swallowed; RoHS limits it to 0.1 % by weight in homogeneous materials (Directive 2011/65/EU Annex II), so leaded solder needs its own hygiene.'
	},
	'flux-fume': {
		code: 'flux-fume',
		words: 'Flux fume',
		rule: 'Run the fume extractor at the joint while soldering.',
		why: "Rosin flux fume is a respiratory sensitiser that causes solderers' asthma; extract it at source (UK HSE guidance)."
	},
	esd: {
		code: 'esd',
		words: 'Static discharge',
		rule: 'Wear a grounded wrist strap and work on the ESD mat.',
		why: 'A discharge can damage parts with no visible sign; ANSI/ESD S20.20 and IEC 61340-5-1 call for a wrist strap grounded through less than 3.5 × 10⁷ Ω.'
	},
	sharp: {
		code: 'sharp',
		words: 'Sharp edges',
		rule: 'Tape cracked glass before handling and cut away from your hands.',
		why: 'Cracked glass and blades cut (common practice, no published source).'
	}
};

export function isCaution(word: string): word is CautionCode {
	return Object.hasOwn(CAUTIONS, word);
}
