import type { FlowDefinition } from './schema';

/**
 * A small flow for the data-first tests (server specs, components, the browser journey), so they do
 * not depend on the shipped flows' step ids. It passes the checker, the v2 rules included:
 *
 *   boots ─ lock screen (data reachable) ──→ inspect ─ corrosion ──→ lift-part (hot air) → replaced
 *         │                                          ├ shorted rail → short (board-level verdict)
 *         │                                          └ clean ──────→ fine (no fault)
 *         ├ readable, board hot at once (reachable) → lift-part
 *         └ stays dark (data unreachable) ──────────→ inspect
 */
export function dataFirstFlow(id = 'data-first-fixture'): FlowDefinition {
	const waterRisk =
		'Water resistance is no longer assured once the phone has been opened, unless new adhesive and seals are fitted.';
	return {
		id,
		title: 'Data first fixture',
		summary: 'For tests of the data-first gate.',
		symptoms: ['no-power'],
		start: 'boots',
		steps: {
			boots: {
				kind: 'symptom',
				title: 'Does the phone start?',
				minutes: 1,
				outcomes: [
					{ label: 'Boots to the lock screen', next: 'inspect', records: 'data-reachable' },
					{
						label: 'Readable, but the board needs work at once',
						next: 'lift-part',
						records: 'data-reachable'
					},
					{ label: 'Stays dark', next: 'inspect', records: 'data-unreachable' }
				]
			},
			inspect: {
				kind: 'test',
				title: 'Inspect the board under the microscope',
				minutes: 5,
				outcomes: [
					{ label: 'Corrosion under a part', next: 'lift-part' },
					{ label: 'Shorted rail', next: 'short' },
					{ label: 'Clean', next: 'fine' }
				]
			},
			'lift-part': {
				kind: 'test',
				title: 'Lift the corroded part with hot air',
				body: 'Disconnect the battery first; shield the neighbours.',
				cautions: ['hot-air', 'battery', 'flux-fume', 'lead', 'eye'],
				minutes: 20,
				outcomes: [{ label: 'Part replaced', next: 'replaced' }]
			},
			replaced: {
				kind: 'verdict',
				title: 'Part replaced on the board',
				verdict: {
					code: 'part-replaced',
					severity: 'board-level',
					repair: '- [ ] Test every function\n- [ ] Reassemble with new adhesive and seals',
					risks: `May fail again later. ${waterRisk}`
				}
			},
			short: {
				kind: 'verdict',
				title: 'Short on the board',
				verdict: {
					code: 'short',
					severity: 'board-level',
					repair: '- [ ] Find the shorted part\n- [ ] Reassemble with new adhesive and seals',
					risks: `May return. ${waterRisk}`
				}
			},
			fine: {
				kind: 'verdict',
				title: 'No fault found',
				verdict: {
					code: 'fine',
					severity: 'no-fault',
					repair: '- [ ] Return the phone',
					risks: 'None known.'
				}
			}
		}
	};
}
