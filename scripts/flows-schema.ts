/** npm run flows:schema — writes flows/flow.schema.json from the zod schema of the flow format. */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { FLOW_SCHEMA_FILE, flowJsonSchemaText } from '../src/lib/flows/json-schema';

const target = fileURLToPath(new URL(`../${FLOW_SCHEMA_FILE}`, import.meta.url));
writeFileSync(target, flowJsonSchemaText());
console.log(`Wrote ${FLOW_SCHEMA_FILE}`);
