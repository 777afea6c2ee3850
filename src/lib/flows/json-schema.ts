/** The JSON Schema of the flow format, generated from the zod schema for editors. */
import { z } from 'zod';
import { flowSchema } from './schema';

export const FLOW_SCHEMA_FILE = 'flows/flow.schema.json';

/** Exact text of flows/flow.schema.json; `npm run flows:schema` writes it. */
export function flowJsonSchemaText(): string {
	// draft-7: the draft that YAML editors' language servers support best.
	const schema = z.toJSONSchema(flowSchema, { target: 'draft-7' });
	return `${JSON.stringify(schema, null, '\t')}\n`;
}
