/**
 * The one refusal of the domain layer: a rule said no and nothing was changed. Queries throw it
 * with the HTTP status the refusal deserves, a stable machine code, a sentence for the person at
 * the bench and, optionally, details: `field` (the form field the message belongs beside) and any
 * extra facts a client reads (a run's `state`, a flow's `problems`, a draft's `current`).
 * `$lib/server/http` answers it for API routes and form actions alike. No framework imports here:
 * command-line scripts throw and catch it too.
 */
export type RuleStatus = 400 | 403 | 404 | 409 | 413 | 415 | 422 | 502 | 503;
export type RuleDetails = { field?: string } & Record<string, unknown>;

export class RuleError extends Error {
	override readonly name = 'RuleError';
	constructor(
		readonly status: RuleStatus,
		readonly code: string,
		message: string,
		readonly details: RuleDetails = {}
	) {
		super(message);
	}

	/** The form field the message belongs beside, if any. */
	get field(): string | undefined {
		return this.details.field;
	}
}

/** True for a RuleError, optionally only with one of `codes`. */
export function isRuleError(e: unknown, ...codes: string[]): e is RuleError {
	return e instanceof RuleError && (codes.length === 0 || codes.includes(e.code));
}
