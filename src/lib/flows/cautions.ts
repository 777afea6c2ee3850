/**
 * The fixed caution vocabulary of flow steps. Each entry carries the words the run screen shows,
 * a one-line rule, and why the rule exists with its source (see docs trade-reference §7).
 */

export const CAUTION_CODES = [
	'battery',
	'hot-air',
	'opening-heat',
	'solvent',
	'uv',
	'lead',
	'flux-fume',
	'esd',
	'sharp',
	'eye',
	'freeze-spray',
	'electrolyte',
	'contaminated',
	'uv-resin',
	'bench-supply',
	'charging-wet',
	'ultrasonic'
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
		rule: 'Disconnect the battery as soon as the phone is open, before unplugging anything or heating the board; a bulging, hissing or leaking cell goes into the fire-resistant container.',
		why: 'Crushing, puncture or heat can start thermal runaway in a lithium-ion cell: fire and toxic gases including hydrogen fluoride (OSHA Safety and Health Information Bulletin, 2019). Disconnecting first is common practice.'
	},
	'hot-air': {
		code: 'hot-air',
		words: 'Hot air',
		rule: 'Battery out or disconnected and shielded; keep the nozzle moving and let the board cool before handling.',
		why: 'Heat is one of the triggers of lithium-ion thermal runaway (OSHA Safety and Health Information Bulletin, 2019). Nozzle and board stay hot enough to burn after the air stops (common practice, no published source).'
	},
	'opening-heat': {
		code: 'opening-heat',
		words: 'Heat to open',
		rule: 'The battery is still connected: use the least heat that softens the adhesive (a heat pad, or low hot air kept moving), never aimed at the battery; stop if the phone swells, hisses or smells, and never heat it while alcohol is wet.',
		why: 'Heat is one of the triggers of lithium-ion thermal runaway (OSHA Safety and Health Information Bulletin, 2019), and a liquid-damaged cell may already be weakened. How much heat the adhesive needs is common practice, no published source.'
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
		rule: 'Wash hands before eating, drinking or smoking; no food or drink at the bench; clean the bench wet, never by blowing.',
		why: 'Lead is toxic when swallowed or breathed as dust. Occupational lead rules call for this hygiene: OSHA 29 CFR 1910.1025 (hygiene facilities and practices) and, in Great Britain, the Control of Lead at Work Regulations 2002 (HSE).'
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
	},
	eye: {
		code: 'eye',
		words: 'Eye protection',
		rule: 'Wear safety glasses while prying glass, cutting adhesive or soldering.',
		why: 'Glass shards, springing clips and spitting flux or solder reach the eyes without warning (common practice, no published source).'
	},
	'freeze-spray': {
		code: 'freeze-spray',
		words: 'Freeze spray',
		rule: 'Short bursts only, never on skin; no flame, hot air or sparks nearby; ventilate; ground yourself before spraying near the board.',
		why: 'The spray causes cold burns on contact, most cans use a flammable propellant, and the jet can build up static charge (safety data sheets of the product category; common practice).'
	},
	electrolyte: {
		code: 'electrolyte',
		words: 'Leaking electrolyte',
		rule: 'Nitrile gloves and eye protection, good ventilation; do not touch or smell the residue; the cell goes into the fire-resistant container.',
		why: 'The electrolyte salt (LiPF₆) forms hydrogen fluoride with moisture; the NIOSH Pocket Guide lists hydrogen fluoride at REL 3 ppm TWA, 6 ppm ceiling (figures from memory: check the guide). Handling practice is common practice.'
	},
	contaminated: {
		code: 'contaminated',
		words: 'Contaminated liquid',
		rule: 'Gloves for a phone that was in sewage, toilet water or an unknown chemical; clean it before the bench; wash hands afterwards.',
		why: "Sewage and toilet water carry germs, and an unknown chemical may burn or poison (common practice, no published source; follow your shop's hygiene procedure)."
	},
	'uv-resin': {
		code: 'uv-resin',
		words: 'UV-cured resin',
		rule: 'Gloves while applying UV-cured solder mask; wipe spills at once; cure fully before handling bare.',
		why: 'Uncured acrylate resins are skin sensitisers: repeated contact can cause allergic dermatitis (safety data sheets of UV-cured solder masks; common practice).'
	},
	'bench-supply': {
		code: 'bench-supply',
		words: 'Bench supply on a board',
		rule: "Battery disconnected; check polarity; set the current limit before switching on; never above the line's nominal voltage.",
		why: 'Reversed polarity, an unlimited current or an over-voltage burns parts and tracks that were still good (common practice, no published source).'
	},
	'charging-wet': {
		code: 'charging-wet',
		words: 'Charging after liquid',
		rule: 'Only once the phone has been opened, dried and cleaned; never unattended; on a non-flammable surface, away from anything that burns.',
		why: 'Charging voltage on a wet port or board drives corrosion, and a liquid-damaged cell or board can short and overheat (common practice; OSHA Safety and Health Information Bulletin on lithium batteries, 2019, for the fire risk).'
	},
	ultrasonic: {
		code: 'ultrasonic',
		words: 'Ultrasonic cleaner',
		rule: 'Shields off first; never put the cell, microphones or sensors with open ports in; a flammable solvent only in a tank built for it.',
		why: 'Cavitation tears microphone and pressure-sensor membranes, and an ordinary tank heats and can ignite flammable solvent vapour (common practice, no published source).'
	}
};

export function isCaution(word: string): word is CautionCode {
	return Object.hasOwn(CAUTIONS, word);
}
