import type { FlowDefinition } from '$lib/flows/schema';

/**
 * The first draft of a flow started from nothing: one question and two verdicts, so it passes the
 * check from the start and the editor has something to grow from.
 */
export function starterFlow(id: string, title: string): FlowDefinition {
	return {
		id,
		title,
		summary: 'What this flow is for, and when to use it.',
		symptoms: [],
		start: 'first-look',
		steps: {
			'first-look': {
				kind: 'symptom',
				title: 'What does the phone do when powered on?',
				minutes: 2,
				outcomes: [
					{ label: 'Works normally', next: 'no-fault-found' },
					{ label: 'Something is wrong', next: 'needs-repair' }
				]
			},
			'no-fault-found': {
				kind: 'verdict',
				title: 'No fault found',
				verdict: {
					code: 'no-fault-found',
					severity: 'no-fault',
					repair: '- [ ] Dry and clean the phone',
					risks: 'Liquid damage can show up later; tell the customer to come back if it does.'
				}
			},
			'needs-repair': {
				kind: 'verdict',
				title: 'Needs repair',
				verdict: {
					code: 'needs-repair',
					severity: 'repair',
					repair: '- [ ] Describe the repair',
					risks: 'Say what may still be wrong after the repair.'
				}
			}
		}
	};
}
