import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseFlow } from './parse';
import { SCHEMA_COMMENT, toFlowYaml } from './to-yaml';

const dir = path.resolve('flows');
const files = fs.readdirSync(dir).filter((n) => n.endsWith('.flow.yaml'));

describe('toFlowYaml', () => {
	it.each(files)('%s: export then parse gives back the same definition, steps in the same order', (name) => {
		const parsed = parseFlow(fs.readFileSync(path.join(dir, name), 'utf8'));
		if (!parsed.ok) throw new Error(`${name} should parse`);
		const text = toFlowYaml(parsed.definition);
		expect(text.split('\n')[0]).toBe(`# ${SCHEMA_COMMENT}`);
		const again = parseFlow(text);
		expect(again.ok && again.definition).toEqual(parsed.definition);
		expect(again.ok && Object.keys(again.definition.steps)).toEqual(Object.keys(parsed.definition.steps));
	});

	it('writes keys in the format order and outcomes inline, whatever order they came in', () => {
		const text = toFlowYaml({
			steps: {
				done: {
					verdict: { risks: 'None.', repair: 'Nothing.', severity: 'no-fault', code: 'done' },
					title: 'Done',
					kind: 'verdict'
				},
				ask: { outcomes: [{ next: 'done', label: 'Yes' }], minutes: 1, title: 'Ask', kind: 'symptom' }
			},
			start: 'ask',
			symptoms: ['wet'],
			summary: 'S',
			title: 'T',
			id: 'tiny'
		});
		expect(text).toBe(
			[
				`# ${SCHEMA_COMMENT}`,
				'',
				'id: tiny',
				'title: T',
				'summary: S',
				'symptoms: [wet]',
				'start: ask',
				'steps:',
				'  done:',
				'    kind: verdict',
				'    title: Done',
				'    verdict:',
				'      code: done',
				'      severity: no-fault',
				'      repair: Nothing.',
				'      risks: None.',
				'',
				'  ask:',
				'    kind: symptom',
				'    title: Ask',
				'    minutes: 1',
				'    outcomes:',
				'      - {label: Yes, next: done}',
				''
			].join('\n')
		);
	});

	it('places the changelog and provenance where authors write them, entries in about/basis/source order', () => {
		const def = {
			steps: {
				ask: {
					outcomes: [{ next: 'ask', label: 'Again' }],
					provenance: [{ source: 'from memory', basis: 'common-practice', about: '5 min watch' }],
					minutes: 5,
					cautions: ['esd'],
					title: 'Watch it for 5 min',
					kind: 'symptom'
				}
			},
			start: 'ask',
			changelog: 'Version 2: the watch is five minutes.',
			symptoms: ['wet'],
			summary: 'S',
			title: 'T',
			id: 'tiny'
		} as const;
		const text = toFlowYaml(def as never);
		expect(text).toContain(
			[
				'symptoms: [wet]',
				'changelog: "Version 2: the watch is five minutes."',
				'start: ask',
				'steps:',
				'  ask:',
				'    kind: symptom',
				'    title: Watch it for 5 min',
				'    cautions: [esd]',
				'    provenance:',
				'      - about: 5 min watch',
				'        basis: common-practice',
				'        source: from memory',
				'    minutes: 5'
			].join('\n')
		);
		const again = parseFlow(text);
		expect(again.ok && again.definition.steps.ask.provenance).toEqual([
			{ about: '5 min watch', basis: 'common-practice', source: 'from memory' }
		]);
		expect(again.ok && again.definition.changelog).toBe(def.changelog);
	});
});
