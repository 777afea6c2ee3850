import type { FlowDefinition } from './schema';

/**
 * A small flow that passes the check, shared by the tests of the edit operations and the editor's
 * components: look → (dry | wet → measure → verdicts).
 */
export function tinyFlow(): FlowDefinition {
	return {
		id: 'tiny',
		title: 'Tiny',
		summary: 'For tests.',
		symptoms: ['no-power'],
		start: 'look',
		steps: {
			look: {
				kind: 'symptom',
				title: 'Look at the phone',
				minutes: 1,
				outcomes: [
					{ label: 'Dry', next: 'fine' },
					{ label: 'Wet', next: 'draw' }
				]
			},
			draw: {
				kind: 'measure',
				title: 'Current draw',
				minutes: 2,
				unit: 'A',
				provenance: [{ about: 'the 0.5 A line between low and high draw', basis: 'common-practice' }],
				domain: { min: 0 },
				ranges: [
					{ max: 0.5, next: 'fine', label: 'Low' },
					{ min: 0.5, next: 'short', label: 'High' }
				]
			},
			fine: {
				kind: 'verdict',
				title: 'No fault',
				verdict: { code: 'fine', severity: 'no-fault', repair: '- [ ] Clean', risks: 'None.' }
			},
			short: {
				kind: 'verdict',
				title: 'Short on the board',
				verdict: {
					code: 'short',
					severity: 'board-level',
					repair: '- [ ] Find it\n- [ ] New adhesive and seals',
					risks: 'May return. Water resistance is no longer assured.'
				}
			}
		}
	};
}
