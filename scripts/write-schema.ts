/**
 * Write the scenario file's JSON Schema (schema/scenario.schema.json) from the zod schema sere
 * itself validates with, so editors can check and complete scenario files. Run `npm run schema`
 * after changing src/scenario/schema.ts; a test fails while the committed file is out of date.
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';
import { scenarioSchema } from '../src/scenario/schema.js';

type Json = { [key: string]: unknown };

/** Exactly-one-of rules are zod refinements, which JSON Schema cannot see: add them as oneOf. */
function addExactlyOneOf(node: unknown): void {
  if (Array.isArray(node)) { node.forEach(addExactlyOneOf); return; }
  if (!node || typeof node !== 'object') return;
  const obj = node as Json;
  const props = obj['properties'] as Json | undefined;
  if (props) {
    const groups = [['multiply', 'set', 'move'], ['chance', 'every'], ['state', 'states'], ['share', 'at_least', 'at_most']]
      .filter((group) => group.every((key) => key in props)).map((group) => ({ oneOf: group.map((key) => ({ required: [key] })) }));
    // A target has two such rules; JSON Schema takes several through allOf.
    if (groups.length === 1) obj['oneOf'] = groups[0]!.oneOf;
    else if (groups.length > 1) obj['allOf'] = groups;
  }
  Object.values(obj).forEach(addExactlyOneOf);
}

export function scenarioJsonSchema(): string {
  const schema = z.toJSONSchema(scenarioSchema, { io: 'input', unrepresentable: 'any' }) as Json;
  addExactlyOneOf(schema);
  const out = { $id: 'https://sere.invalid/scenario.schema.json', title: 'sere scenario file', ...schema };
  return JSON.stringify(out, null, 2) + '\n';
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  writeFileSync(new URL('../../schema/scenario.schema.json', import.meta.url), scenarioJsonSchema());
}
