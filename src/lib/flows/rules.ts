/**
 * The trade rules of flow version 2 (FLOW-RULES.md): every number has a provenance, every hazard
 * its cautions, every verdict a severity that fits its repair and an honest word on water
 * resistance. Pure and isomorphic; one pass over the steps, a handful of regular expressions
 * over each step's text, so a 2,000-step flow still checks in milliseconds.
 *
 * The rules match words, not meaning: "no hot air while wet" mentions hot air. Authors write
 * "no heat while it is wet" where they mean a prohibition.
 */
import type { CautionCode } from './cautions';
import type { FlowProblem } from './problems';
import type { Step } from './schema';

/** A hazard the text may mention, the caution words it needs, and how to spot it. */
export interface HazardRule {
	/** Shown in the message: what the text mentions. */
	name: string;
	pattern: RegExp;
	needs: readonly CautionCode[];
}

export const HAZARD_RULES: readonly HazardRule[] = [
	{ name: 'hot air', pattern: /\bhot[\s-]air\b|\breflow|\bpreheat/i, needs: ['hot-air', 'battery'] },
	// Opening with heat comes before the battery can be disconnected; "no heat" does not match.
	{
		name: 'heat to open',
		pattern: /\b(?:least|gentle|low)\s+heat\b|\bheat\s+pad\b/i,
		needs: ['opening-heat', 'battery']
	},
	{
		name: 'solder',
		pattern: /\b(?:de)?solder|\bflux|\bwick\b|\breball/i,
		needs: ['flux-fume', 'lead', 'eye']
	},
	{ name: 'isopropyl alcohol', pattern: /\bisopropyl|\balcohol/i, needs: ['solvent'] },
	{ name: 'UV', pattern: /\buv\b|\bsolder[\s-]mask/i, needs: ['uv', 'uv-resin'] },
	{ name: 'freeze spray', pattern: /\bfreeze[\s-]spray/i, needs: ['freeze-spray'] },
	{ name: 'ultrasonic', pattern: /\bultrasonic/i, needs: ['ultrasonic'] },
	{ name: 'bench supply', pattern: /\bbench\s+(?:power\s+)?supply/i, needs: ['bench-supply'] },
	{ name: 'prying', pattern: /\bpry(?:ing)?\b|\bopen\s+the\s+phone\b/i, needs: ['eye'] },
	{ name: 'charging', pattern: /\bcharg(?:er|ers|ing)\b/i, needs: ['charging-wet'] },
	{ name: 'electrolyte', pattern: /\belectrolyte/i, needs: ['electrolyte'] }
];

/** The hazard names whose words, in a verdict's repair, make it board work. */
const BOARD_WORK = HAZARD_RULES.filter((r) => r.name === 'hot air' || r.name === 'solder');

/**
 * A number followed by one of the units a technician compares against ("0.02 A", "125 °C",
 * "5 min", "99 %"). Ω may be the Greek letter or the ohm sign. Case-sensitive on purpose: "MSL 5a" is a moisture level, not 5 amperes. The
 * number may not be glued to a word ("Sn63Pb37") and the unit may not run on into one ("3 sensors").
 */
export const NUMBER_WITH_UNIT =
	/(?<![\p{L}\p{N}.,])\d+(?:[.,]\d+)?\s?(?:°C|°F|K|mV|V|mA|[µμ]A|A|[kMm]?[ΩΩ]|W|s|mins?|h|%|ppm|mm|m)(?![\p{L}\p{N}])/u;

/** Severities whose repair opens the phone and closes it again. */
const OPENS_THE_PHONE = new Set(['repair', 'replace', 'board-level']);

/** Title, body and (for a verdict) repair and risks: the words the rules read. */
export function stepText(step: Step): string {
	const parts = [step.title, step.body ?? ''];
	if (step.kind === 'verdict') parts.push(step.verdict.repair, step.verdict.risks);
	return parts.join('\n');
}

/** The trade-rule problems of one step, appended to `problems`. */
export function ruleProblems(id: string, step: Step, problems: FlowProblem[]): void {
	const at = ['steps', id];
	const text = stepText(step);
	provenance(id, step, text, at, problems);
	cautions(id, step, text, at, problems);
	if (step.kind === 'verdict') verdictRules(id, step, at, problems);
}

function provenance(id: string, step: Step, text: string, at: string[], problems: FlowProblem[]) {
	const entries = step.provenance ?? [];
	entries.forEach((entry, k) => {
		if (entry.basis === 'published' && !entry.source)
			problems.push({
				code: 'provenance-unsourced',
				step: id,
				path: [...at, 'provenance', k, 'source'],
				message: `The entry about "${entry.about}" says the value is published but names no source. Add source: with the standard, clause or guide it comes from (say "from memory" if it is), or change basis to common-practice or maker.`
			});
	});
	if (entries.length > 0) return;
	const hasRanges = step.kind === 'measure' && (step.ranges?.length ?? 0) > 0;
	const number = hasRanges ? null : NUMBER_WITH_UNIT.exec(text);
	if (!hasRanges && !number) return;
	const what = hasRanges
		? "This measurement's ranges are numbers"
		: `The text states "${number![0]}", a number`;
	problems.push({
		code: 'provenance-missing',
		step: id,
		path: [...at, 'provenance'],
		message: `${what} the technician compares against, but the step says nowhere where it comes from. Add provenance: a list of entries with about (the value in words), basis (published, maker or common-practice) and, for published, the source.`
	});
}

function cautions(id: string, step: Step, text: string, at: string[], problems: FlowProblem[]) {
	const have = new Set(step.cautions ?? []);
	const mentions: string[] = [];
	const missing = new Set<string>();
	for (const rule of HAZARD_RULES) {
		const lacking = rule.needs.filter((w) => !have.has(w));
		if (lacking.length === 0) continue;
		const found = rule.pattern.exec(text);
		if (!found) continue;
		mentions.push(`"${found[0]}"`);
		for (const w of lacking) missing.add(w);
	}
	if (mentions.length === 0) return;
	problems.push({
		code: 'caution-missing',
		step: id,
		path: [...at, 'cautions'],
		message: `The text mentions ${listed(mentions)}, so the step needs the caution${missing.size > 1 ? 's' : ''} ${[...missing].join(', ')}. Add ${missing.size > 1 ? 'them' : 'it'} to the step's cautions.`
	});
}

function verdictRules(id: string, step: Step & { kind: 'verdict' }, at: string[], problems: FlowProblem[]) {
	const { severity, repair, risks } = step.verdict;
	if (severity !== 'board-level' && severity !== 'uneconomic')
		for (const rule of BOARD_WORK) {
			const found = rule.pattern.exec(repair);
			if (!found) continue;
			problems.push({
				code: 'severity-mismatch',
				step: id,
				path: [...at, 'verdict', 'severity'],
				message: `The repair uses "${found[0]}", which is board work, but the severity is ${severity}. Make it board-level (or uneconomic); replace is a module swap at its connector and repair is cleaning or reseating, both without heat or solder.`
			});
			break;
		}
	if (!OPENS_THE_PHONE.has(severity)) return;
	if (!/water\s+resistance/i.test(risks))
		problems.push({
			code: 'water-resistance-missing',
			step: id,
			path: [...at, 'verdict', 'risks'],
			message:
				'The repair opens the phone, so the risks must say that water resistance is no longer assured unless new adhesive and seals are fitted. Add that sentence to risks.'
		});
	if (!/adhesive|\bseal/i.test(repair))
		problems.push({
			code: 'water-resistance-missing',
			step: id,
			path: [...at, 'verdict', 'repair'],
			message:
				'The repair opens the phone, so its checklist must end with the reassembly: fit new adhesive and seals. Add that step to repair.'
		});
}

/** "a", "a and b", "a, b and c". */
function listed(words: string[]): string {
	return words.length < 2 ? words.join('') : `${words.slice(0, -1).join(', ')} and ${words.at(-1)}`;
}
