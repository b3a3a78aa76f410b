import { isMap, isNode, isScalar, LineCounter, parseDocument, visit, type Document } from 'yaml';
import type { z } from 'zod';
import { SereError, quote, type ErrorCode, type Place } from '../errors.js';
import { readTextFile } from './read-text-file.js';
import { restoreProtoKeys, shieldProtoKeys, userKey } from './proto-keys.js';
import { editDistance } from './label-typos.js';

export type KeyPath = readonly (string | number)[];

export interface Structured<T> {
  readonly value: T;
  readonly sha256: string;
  /** file:line:column of the node at a key path (or of its nearest existing parent). */
  locate(path: KeyPath): Place;
}

/** `start.shares.reedbed`, `show[2]`. */
export function formatKeyPath(path: KeyPath): string {
  return path.reduce<string>((out, key) =>
    typeof key === 'number' ? `${out}[${key}]` : out ? `${out}.${key}` : key, '');
}

/**
 * Read a YAML (or JSON — JSON is YAML 1.2) file and validate it against a zod schema. The yaml
 * library's LineCounter and node ranges turn a zod issue's key path into file:line:column, so the
 * user is sent to the exact spot; unknown keys (typos) point at the key itself.
 */
export function readStructured<T>(file: string, schema: z.ZodType<T>, what: string, code: ErrorCode): Structured<T> {
  const { text, sha256 } = readTextFile(file, what);
  return structuredFromText(file, text, sha256, schema, what, code);
}

/** readStructured on text already read. */
export function structuredFromText<T>(file: string, text: string, sha256: string, schema: z.ZodType<T>, what: string, code: ErrorCode): Structured<T> {
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, prettyErrors: true, uniqueKeys: true });
  const syntax = doc.errors[0];
  if (syntax) {
    const pos = syntax.linePos?.[0];
    throw new SereError('BAD_YAML', `not valid YAML/JSON: ${syntax.message.split('\n')[0]!.replace(/ at line \d+, column \d+:?$/, '')}`,
      { file, line: pos?.line, column: pos?.col }, `fix the ${what}'s syntax at that spot`);
  }
  const locate = (path: KeyPath): Place => locateIn(doc, lineCounter, file, path);
  const parsed = schema.safeParse(shieldProtoKeys(plainValue(doc, lineCounter, file, what)));
  if (!parsed.success) {
    const { issues } = parsed.error;
    // An unknown key first: a misspelt required key (`horizen`) also makes `horizon` missing, and
    // the misspelling is what the user has to fix.
    const issue = issues.find((i) => i.code === 'unrecognized_keys') ?? issues[0]!;
    const base = issue.path.filter((p): p is string | number => typeof p !== 'symbol').map(userKey);
    const keys = issue.code === 'unrecognized_keys' ? issue.keys.map(userKey) : [];
    const path = keys.length > 0 ? [...base, keys[0]!] : base;
    const place = keys.length > 0 ? locateKey(doc, lineCounter, file, base, keys[0]!) : locate(path);
    const message = keys.length > 0 ? `unknown key ${quote(keys[0]!)}` : issue.message;
    const meant = keys.length > 0 ? knownKeyLike(schema, base, keys[0]!) : undefined;
    throw new SereError(code, message, { ...place, path: formatKeyPath(path) || undefined },
      meant !== undefined ? `did you mean ${quote(meant)}?`
        : keys.length > 0 ? `check its spelling against the ${what} format in the README` : `see the ${what} format in the README`);
  }
  return { value: restoreProtoKeys(parsed.data), sha256, locate };
}

/** The keys a schema allows at a key path: objects' shapes, through optional, default, union, array and pipe. */
function keysAt(schema: z.ZodType, path: readonly (string | number)[]): Set<string> {
  const found = new Set<string>();
  const walk = (node: z.ZodType, at: number, depth: number): void => {
    if (depth > 40) return;
    const def = (node as unknown as { _zod: { def: Record<string, unknown> & { type: string } } })._zod.def;
    const inner = (x: unknown): void => { if (x) walk(x as z.ZodType, at, depth + 1); };
    switch (def.type) {
      case 'optional': case 'default': case 'nullable': case 'prefault': case 'readonly': case 'catch': case 'nonoptional':
        return inner(def.innerType);
      case 'pipe': return inner(def.in);
      case 'union': for (const o of def.options as z.ZodType[]) walk(o, at, depth + 1); return;
      case 'array': if (typeof path[at] === 'number') walk(def.element as z.ZodType, at + 1, depth + 1); return;
      case 'record': if (at < path.length) walk(def.valueType as z.ZodType, at + 1, depth + 1); return;
      case 'object': {
        const shape = def.shape as Record<string, z.ZodType>;
        if (at === path.length) { for (const key of Object.keys(shape)) found.add(key); return; }
        const next = shape[String(path[at])];
        if (next) walk(next, at + 1, depth + 1);
        return;
      }
      default: return;
    }
  };
  walk(schema, 0, 0);
  return found;
}

/** The one known key at that place one or two edits from the unknown one, if exactly one is. */
function knownKeyLike(schema: z.ZodType, base: readonly (string | number)[], unknown: string): string | undefined {
  const near = [...keysAt(schema, base)].filter((key) => editDistance(key, unknown) <= 2);
  return near.length === 1 ? near[0] : undefined;
}

/** file:line:column of key paths in a text, parsed by the yaml library (only when asked). */
export function yamlLocator(file: string, text: string): (path: KeyPath) => Place {
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, uniqueKeys: true });
  return (path) => locateIn(doc, lineCounter, file, path);
}

/**
 * The document as plain data. Aliases are where YAML input can hurt: one naming no anchor, or
 * aliases nested to expand exponentially (an "alias bomb" — the yaml library stops past
 * MAX_ALIAS_COUNT expansions). Both are the user's input, reported at the first alias.
 */
const MAX_ALIAS_COUNT = 1000;
function plainValue(doc: Document, lineCounter: LineCounter, file: string, what: string): unknown {
  try {
    const value: unknown = doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
    if (isCyclic(value)) throw new ReferenceError('an alias refers to a value it is part of');
    return value;
  } catch (err) {
    if (!(err instanceof ReferenceError)) throw err;
    let at: Place = { file };
    visit(doc, {
      Alias(_, node) {
        if (node.range) at = position(lineCounter, file, node.range[0]);
        return visit.BREAK;
      },
    });
    const unresolved = /unresolved alias/i.test(err.message);
    const cyclic = /part of/.test(err.message);
    throw new SereError('BAD_YAML',
      unresolved ? 'an alias (*name) refers to no anchor (&name) defined before it'
        : cyclic ? 'an alias (*name) refers to the value it is part of' : 'aliases (*name) expand too many times',
      at, unresolved ? `define the anchor before the alias, or write the value out in the ${what}` : `write the values out instead of nesting aliases in the ${what}`);
  }
}

/** Whether a value holds itself (YAML `&a [*a]` becomes a self-containing array; schemas would recurse forever). */
function isCyclic(value: unknown, ancestors = new Set<object>()): boolean {
  if (value === null || typeof value !== 'object') return false;
  if (ancestors.has(value)) return true;
  ancestors.add(value);
  const found = Object.values(value).some((v) => isCyclic(v, ancestors));
  ancestors.delete(value);
  return found;
}

function position(lineCounter: LineCounter, file: string, offset: number): Place {
  const { line, col } = lineCounter.linePos(offset);
  return { file, line, column: col };
}

function locateIn(doc: Document, lineCounter: LineCounter, file: string, path: KeyPath): Place {
  for (let n = path.length; n >= 0; n--) {
    const node = n === 0 ? doc.contents : doc.getIn(path.slice(0, n), true);
    if (isNode(node) && node.range) {
      return { ...position(lineCounter, file, node.range[0]), path: formatKeyPath(path) || undefined };
    }
  }
  return { file, path: formatKeyPath(path) || undefined };
}

function locateKey(doc: Document, lineCounter: LineCounter, file: string, parent: KeyPath, key: string): Place {
  const map = parent.length === 0 ? doc.contents : doc.getIn(parent, true);
  if (isMap(map)) {
    for (const pair of map.items) {
      if (isScalar(pair.key) && pair.key.value === key && pair.key.range) {
        return position(lineCounter, file, pair.key.range[0]);
      }
    }
  }
  return locateIn(doc, lineCounter, file, parent);
}
