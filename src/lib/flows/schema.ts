/**
 * The flow file format (`flows/<id>.flow.yaml`) as a zod schema.
 *
 * The schema checks shape and types only. Everything that needs the whole graph (targets,
 * reachability, ranges, cautions) is judged by `checkFlow` so that each fault gets its own
 * problem code instead of a generic "schema" error.
 */
import { z } from 'zod';
import { CAUTION_CODES } from './cautions';

export { CAUTIONS, CAUTION_CODES, isCaution, type Caution, type CautionCode } from './cautions';

const KEBAB = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;
const kebabMessage = 'must be kebab-case: lower-case letters, digits and single hyphens (e.g. boot-current)';

/** Ids the library's own pages use (`/flows/new`, `/flows/symptoms`): a flow with one of them could never be opened. */
export const RESERVED_FLOW_IDS: readonly string[] = ['new', 'symptoms'];

export const kebabId = z.string().regex(KEBAB, kebabMessage);
const markdown = z.string().meta({ description: 'Markdown' });
const text = z.string().trim().min(1, 'must not be empty');

export const STEP_KINDS = ['symptom', 'test', 'measure', 'verdict'] as const;
export type StepKind = (typeof STEP_KINDS)[number];

export const SEVERITIES = ['repair', 'replace', 'board-level', 'uneconomic', 'no-fault'] as const;
export type Severity = (typeof SEVERITIES)[number];

/** What an answer proves about the customer's data; the run report shows it. */
export const RECORDS = ['data-reachable', 'data-unreachable'] as const;

// Any string is accepted here; checkFlow reports words outside the vocabulary as
// `unknown-caution`. The enum in the metadata lets editors flag them while authoring.
const caution = z.string().meta({ enum: [...CAUTION_CODES] });

const minutes = z
	.number()
	.min(0, 'minutes cannot be negative')
	.max(24 * 60, 'more than a day of hands-on time is surely a typo')
	.meta({ description: 'Expected hands-on minutes for this step' });

/** Where a number comes from: a named published source, the maker's documentation, or the trade's common practice. */
export const BASES = ['published', 'maker', 'common-practice'] as const;
export type Basis = (typeof BASES)[number];

export const provenanceSchema = z.strictObject({
	about: text.meta({ description: 'The value(s) this covers, e.g. "0.02 A standby limit"' }),
	basis: z
		.enum(BASES)
		.meta({ description: 'published, maker (documentation) or common-practice (no published source)' }),
	source: text.optional().meta({
		description: 'The named source (required when basis is published), or a note such as "from memory"'
	})
});

const common = {
	title: text,
	body: markdown.optional(),
	cautions: z.array(caution).optional(),
	provenance: z
		.array(provenanceSchema)
		.optional()
		.meta({ description: 'Where every number this step asks the technician to compare against comes from' })
};

export const outcomeSchema = z.strictObject({
	label: text,
	next: z.string(),
	records: z.enum(RECORDS).optional()
});

export const rangeSchema = z.strictObject({
	min: z.number().optional().meta({ description: 'Inclusive lower bound; missing means open' }),
	max: z.number().optional().meta({ description: 'Exclusive upper bound; missing means open' }),
	next: z.string(),
	label: text.optional().meta({ description: 'Short name of the band, e.g. "No draw"' }),
	records: z.enum(RECORDS).optional()
});

export const domainSchema = z.strictObject({
	min: z.number().optional().meta({ description: 'Lowest valid reading (inclusive)' }),
	max: z.number().optional().meta({ description: 'Highest valid reading (inclusive)' })
});

// Outcomes may be missing or empty so that checkFlow can say `no-exits` in plain words.
const choiceStep = <K extends 'symptom' | 'test'>(kind: K) =>
	z.strictObject({
		kind: z.literal(kind),
		...common,
		minutes,
		outcomes: z.array(outcomeSchema).optional()
	});

export const symptomStepSchema = choiceStep('symptom');
export const testStepSchema = choiceStep('test');

export const measureStepSchema = z.strictObject({
	kind: z.literal('measure'),
	...common,
	minutes,
	unit: text.meta({ description: 'Unit of the reading, e.g. A, V, mA, Ω' }),
	instrument: text.optional().meta({ description: 'e.g. bench power supply, USB power meter' }),
	domain: domainSchema.optional(),
	ranges: z.array(rangeSchema).optional()
});

export const verdictSchema = z.strictObject({
	code: kebabId,
	severity: z.enum(SEVERITIES),
	repair: markdown.meta({ description: 'Markdown checklist of the repair' }),
	parts: z.array(text).optional(),
	risks: markdown.meta({ description: 'What may still be wrong, what to tell the customer' })
});

export const verdictStepSchema = z.strictObject({
	kind: z.literal('verdict'),
	...common,
	minutes: minutes.optional(),
	verdict: verdictSchema,
	// Accepted only so that checkFlow can report `verdict-has-exits` clearly.
	outcomes: z.array(z.unknown()).optional().meta({ description: 'Not allowed: a verdict ends the flow' }),
	ranges: z.array(z.unknown()).optional().meta({ description: 'Not allowed: a verdict ends the flow' })
});

export const stepSchema = z.discriminatedUnion('kind', [
	symptomStepSchema,
	testStepSchema,
	measureStepSchema,
	verdictStepSchema
]);

export const flowSchema = z
	.strictObject({
		id: kebabId.meta({ description: 'Equals the file name stem' }),
		title: text,
		summary: markdown,
		symptoms: z.array(kebabId).meta({ description: 'Tags used to suggest this flow at intake' }),
		changelog: markdown.optional().meta({
			description: 'What changed in this version and why; shown in the library beside the version'
		}),
		start: z.string().meta({ description: 'Id of the first step' }),
		steps: z.record(kebabId, stepSchema)
	})
	.meta({ title: 'Tidemark diagnostic flow' });

export type FlowDefinition = z.infer<typeof flowSchema>;
export type Step = z.infer<typeof stepSchema>;
export type SymptomStep = z.infer<typeof symptomStepSchema>;
export type TestStep = z.infer<typeof testStepSchema>;
export type ChoiceStep = SymptomStep | TestStep;
export type MeasureStep = z.infer<typeof measureStepSchema>;
export type VerdictStep = z.infer<typeof verdictStepSchema>;
export type Outcome = z.infer<typeof outcomeSchema>;
export type Range = z.infer<typeof rangeSchema>;
export type Domain = z.infer<typeof domainSchema>;
export type Provenance = z.infer<typeof provenanceSchema>;
export type Verdict = z.infer<typeof verdictSchema>;

// In its own zod-free module so the run screen's machine ships without the validator.
export { exitsOf } from './exits';
