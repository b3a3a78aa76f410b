import type { z } from 'zod';
import type { ErrorCode, Place } from '../errors.js';
import { restoreProtoKeys, shieldProtoKeys } from './proto-keys.js';
import { structuredFromText, yamlLocator, type KeyPath, type Structured } from './read-structured.js';
import { readTextFile } from './read-text-file.js';

/**
 * Read a file sere writes as JSON (a fit file) with JSON.parse, and validate it like
 * readStructured. Measured reason: a fit file of 10,000 sites and 10 states (3.2 MB) took 3.7 s
 * through the yaml library, which builds a node with a position for every number, and 0.12 s
 * this way (best of 5, on a loaded machine; `npm run bench` measures it). Positions are only
 * needed for a message, so:
 *
 * - JSON.parse first. When the text is not strict JSON, repeats a key in an object (JSON.parse
 *   would keep the last silently; the YAML reader refuses it), or fails the schema, the file goes
 *   through readStructured's path, which reports exactly what it always did.
 * - `locate` (for the invariants checked after the schema) parses the text with the yaml library
 *   on its first call, to turn a key path into file:line:column.
 */
export function readJsonStructured<T>(file: string, schema: z.ZodType<T>, what: string, code: ErrorCode): Structured<T> {
  const { text, sha256 } = readTextFile(file, what);
  const value = strictJson(text);
  if (value !== undefined) {
    const parsed = schema.safeParse(shieldProtoKeys(value.json));
    if (parsed.success) {
      let locator: ((path: KeyPath) => Place) | undefined;
      return { value: restoreProtoKeys(parsed.data), sha256, locate: (path) => (locator ??= yamlLocator(file, text))(path) };
    }
  }
  return structuredFromText(file, text, sha256, schema, what, code);
}

/** Every string in JSON text, and whether it is a key (followed by a colon). */
const STRING = /"(?:[^"\\]|\\.)*"(\s*:)?/g;

/** The value of JSON text with no key repeated within an object, or undefined. */
function strictJson(text: string): { json: unknown } | undefined {
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    return undefined;
  }
  // A repeated key leaves fewer keys in the value than the text names.
  let written = 0;
  for (const m of text.matchAll(STRING)) if (m[1] !== undefined) written += 1;
  return written === keysIn(json) ? { json } : undefined;
}

function keysIn(value: unknown): number {
  if (value === null || typeof value !== 'object') return 0;
  let n = 0;
  if (Array.isArray(value)) {
    for (const v of value) if (v !== null && typeof v === 'object') n += keysIn(v);
    return n;
  }
  for (const key of Object.keys(value)) n += 1 + keysIn((value as Record<string, unknown>)[key]);
  return n;
}
