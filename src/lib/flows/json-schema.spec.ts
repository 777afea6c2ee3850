import { readFileSync } from 'node:fs';
import { expect, it } from 'vitest';
import { FLOW_SCHEMA_FILE, flowJsonSchemaText } from './json-schema';
import { CAUTION_CODES } from './cautions';

it('flows/flow.schema.json is current (run `npm run flows:schema` after changing schema.ts)', () => {
	const committed = readFileSync(new URL(`../../../${FLOW_SCHEMA_FILE}`, import.meta.url), 'utf8');
	expect(committed).toBe(flowJsonSchemaText());
});

it('lets editors flag unknown caution words', () => {
	expect(flowJsonSchemaText()).toContain(
		JSON.stringify(CAUTION_CODES, null, '\t').replaceAll('\n', '\n\t\t\t\t\t\t\t\t\t')
	);
});
