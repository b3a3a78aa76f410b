import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { scenarioJsonSchema } from '../../scripts/write-schema.js';

describe('schema/scenario.schema.json', () => {
  it('is up to date with the zod schema (run npm run schema after changing it)', () => {
    expect(readFileSync('schema/scenario.schema.json', 'utf8')).toBe(scenarioJsonSchema());
  });

  it('states exactly-one-of rules for treatments and events, and the defaults', () => {
    const schema = JSON.parse(scenarioJsonSchema());
    const treatment = schema.properties.treatments.items;
    expect(treatment.oneOf).toEqual([{ required: ['multiply'] }, { required: ['set'] }, { required: ['move'] }]);
    expect(schema.properties.events.items.oneOf).toEqual([{ required: ['chance'] }, { required: ['every'] }]);
    expect(schema.properties.level.default).toBe(0.9);
    expect(schema.required).toEqual(['horizon']);
  });
});

describe('the demo scenario files', () => {
  it('validate against the JSON Schema with ajv (an independent JSON Schema 2020-12 validator)', async () => {
    const { default: Ajv2020 } = await import('ajv/dist/2020.js');
    const { parse } = await import('yaml');
    const { readdirSync } = await import('node:fs');
    // ajv's CommonJS default export is typed as a namespace under NodeNext; it is the class at run time.
    const ajv = new (Ajv2020 as unknown as typeof import('ajv').default)({ strict: false });
    const validate = ajv.compile(JSON.parse(scenarioJsonSchema()));
    const files = readdirSync('scenarios/brenhollow').filter((f) => f.endsWith('.yaml'));
    expect(files.length).toBeGreaterThanOrEqual(5);
    for (const f of files) {
      const ok = validate(parse(readFileSync(`scenarios/brenhollow/${f}`, 'utf8')));
      expect(ok, `${f}: ${JSON.stringify(validate.errors)}`).toBe(true);
    }
    expect(validate(parse('data: x.csv\nhorizon: { years: 5 }\ntreatments: [{ name: t, state: a, multiply: { b: 2 }, set: { b: 0.1 } }]'))).toBe(false);
  });
});
