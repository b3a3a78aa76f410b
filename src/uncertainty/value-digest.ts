import { createHash, type Hash } from 'node:crypto';

/**
 * A SHA-256 of a tree of plain data — what a cached result was computed from. Every value is
 * written with a type tag and a length, so no two different trees share a byte string: numbers as
 * their eight IEEE bytes (0 and −0, and NaN, stay distinct), strings as UTF-8, typed arrays as their
 * element type and raw bytes (a fit's counts and site tables hash at memory speed), plain objects
 * with their keys sorted and `undefined` members left out (as JSON leaves them out), class
 * instances likewise under their class's name, Maps and Sets in their order. A function or symbol
 * is not data: `NotData` is thrown, and the caller computes without a cache rather than guess what
 * the value means.
 */
export function digestOf(value: unknown): string {
  const hash = createHash('sha256');
  feed(hash, value);
  return hash.digest('hex');
}

export class NotData extends Error {}

const number = new Float64Array(1);
const numberBytes = new Uint8Array(number.buffer);
const length = new Uint32Array(1);
const lengthBytes = new Uint8Array(length.buffer);

function tag(hash: Hash, t: string, n?: number): void {
  hash.update(t);
  if (n !== undefined) {
    length[0] = n;
    hash.update(lengthBytes);
  }
}

function feed(hash: Hash, value: unknown): void {
  if (value === null) return tag(hash, 'z');
  if (value === undefined) return tag(hash, 'u');
  switch (typeof value) {
    case 'boolean': return tag(hash, value ? 'T' : 'F');
    case 'number':
      number[0] = value;
      tag(hash, 'n');
      hash.update(numberBytes);
      return;
    case 'bigint': return feedString(hash, 'b', value.toString());
    case 'string': return feedString(hash, 's', value);
    case 'object': break;
    default: throw new NotData(`a ${typeof value} is not data`);
  }
  if (ArrayBuffer.isView(value)) {
    tag(hash, `v${value.constructor.name}`, value.byteLength);
    hash.update(new Uint8Array(value.buffer, value.byteOffset, value.byteLength));
    return;
  }
  if (Array.isArray(value)) {
    tag(hash, 'a', value.length);
    for (const item of value) feed(hash, item);
    return;
  }
  if (value instanceof Map) {
    tag(hash, 'm', value.size);
    for (const [key, item] of value) { feed(hash, key); feed(hash, item); }
    return;
  }
  if (value instanceof Set) {
    tag(hash, 'e', value.size);
    for (const item of value) feed(hash, item);
    return;
  }
  // A class instance counts by its class's name and its own fields (a SiteCountTable is its typed
  // arrays); its methods are code, which the caller's key covers. Private (#) fields are not seen,
  // so a class holding state in them must not be handed here.
  const proto = Object.getPrototypeOf(value) as { constructor?: { name?: string } } | null;
  const className = proto === Object.prototype || proto === null ? '' : proto.constructor?.name;
  if (!className && className !== '') throw new NotData('an object of an unnamed class is not data');
  const record = value as Record<string, unknown>;
  const keys = Object.keys(record).filter((key) => record[key] !== undefined).sort();
  if (className) feedString(hash, 'c', className);
  tag(hash, 'o', keys.length);
  for (const key of keys) { feedString(hash, 'k', key); feed(hash, record[key]); }
}

function feedString(hash: Hash, t: string, s: string): void {
  const bytes = Buffer.from(s, 'utf8');
  tag(hash, t, bytes.length);
  hash.update(bytes);
}
