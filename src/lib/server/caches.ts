/**
 * Every in-process cache of database data, in one list: what it keeps and the rule that keeps it
 * fresh. A new cache gets a line here (and its module a `forget…` function), so a reader sees in one
 * place what the server may answer from memory. `clearAll()` is for tests that start over.
 *
 * Not listed, because they hold no copy of the database: values built from code alone (the OpenAPI
 * document, `openapi/document.ts`), connections rebuilt when their configuration changes (SMTP
 * transports in `mail/worker.ts`, the payment SDK client in `payments/config.ts`), the checked
 * environment (`env.ts`, read again when a variable changes) and counters that are state, not
 * copies (rate limits, `rate-store.ts`: in the database on a PostgreSQL server, in memory on PGlite).
 *
 * Access rule: no cache decides whether a request is allowed. The user row is read (through a
 * two-second cache that every staff write clears) on every request, and its session generation must
 * match the token's; a role change or disabling bumps it, so that user's next request is signed out.
 */
import { forgetSessionTokens } from '$lib/server/hooks/user';
import { forgetSignedIn } from '$lib/server/staff/queries';
import { forgetCompiled } from '$lib/server/runs/queries';
import { forgetOpenJobs } from '$lib/server/runs/data-secure';
import { resetStore as forgetInsightsFacts } from '$lib/server/insights/store';
import { forgetAnswers as forgetInsightsAnswers } from '$lib/server/insights/queries';
import { forgetFlowHealth } from '$lib/server/flow-health/queries';
import { resetRevisions } from '$lib/server/flow-health/revisions';

export type Cache = { name: string; where: string; keeps: string; fresh: string; clear: () => void };

export const caches: readonly Cache[] = [
	{
		name: 'session tokens',
		where: 'hooks/user.ts',
		keeps: 'the user id and session generation a session cookie carries, per token (5,000 at most)',
		fresh:
			'a token never changes; kept 60 s and never past its expiry; whether it still counts is checked on every request',
		clear: forgetSessionTokens
	},
	{
		name: 'signed-in users',
		where: 'staff/queries.ts findSignedIn',
		keeps: 'the user row (role, disabled, session generation) per id',
		fresh: '2 s; every staff write clears it before and after it commits (other processes: within 2 s)',
		clear: forgetSignedIn
	},
	{
		name: 'compiled flow machines',
		where: 'runs/queries.ts machineFor',
		keeps: 'the definition and compiled machine of a published or retired version',
		fresh: 'such a version never changes; drafts are never kept',
		clear: forgetCompiled
	},
	{
		name: 'jobs with the data gate open',
		where: 'runs/data-secure.ts',
		keeps: 'ids of jobs not data-first or with a data outcome on record (5,000 at most)',
		fresh: 'both facts are for good (the flag is set at intake; an outcome is replaced, never removed)',
		clear: forgetOpenJobs
	},
	{
		name: 'insights facts and names',
		where: 'insights/store.ts',
		keeps: 'a copy of insight_run_facts; the names of flows, steps, verdicts and staff',
		fresh:
			'facts: rows written since are read before every answer (they commit in seq order, insights/facts.ts); names: read again after 10 s',
		clear: forgetInsightsFacts
	},
	{
		name: 'insights answers',
		where: 'insights/queries.ts',
		keeps: 'each panel computed for a filter',
		fresh: 'until a fact arrives or the names change',
		clear: forgetInsightsAnswers
	},
	{
		name: 'flow health',
		where: 'flow-health/queries.ts',
		keeps: 'version definitions; each version’s computed health',
		fresh:
			'a numbered definition never changes (status is read fresh); health until a fact or revision arrives',
		clear: forgetFlowHealth
	},
	{
		name: 'revised steps',
		where: 'flow-health/revisions.ts',
		keeps: 'which steps of each run were answered again',
		fresh:
			'rows written since are read before every answer, and the BACKs among the last 200 ids again (a server commits ids out of order)',
		clear: resetRevisions
	}
];

/** Empties every cache above (tests that start over with another database). */
export function clearAll() {
	for (const cache of caches) cache.clear();
}
