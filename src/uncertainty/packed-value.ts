import { sharedFloat64 } from './draw-blocks.js';
import { NotData } from './value-digest.js';

/**
 * A tree of plain data (objects, arrays, strings, numbers, booleans, typed arrays) as one byte
 * string and back, bit for bit: the tree as JSON with each typed array replaced by its place in a
 * binary tail, and the numbers JSON cannot write (NaN, ±Infinity, −0) spelled out. Float64Arrays
 * come back in shared memory, as the engine's threads read matrix draws (draw-blocks.ts).
 * Format: 4-byte little-endian length of the JSON, the JSON, zero padding to a multiple of 8,
 * the arrays one after another, each padded to 8 bytes.
 */
type Typed = Float64Array | Float32Array | Int32Array | Uint32Array | Uint16Array | Int16Array | Uint8Array | Int8Array;
const TYPED = { Float64Array, Float32Array, Int32Array, Uint32Array, Uint16Array, Int16Array, Uint8Array, Int8Array } as const;
type TypedName = keyof typeof TYPED;

const pad8 = (n: number): number => Math.ceil(n / 8) * 8;

/**
 * The packed bytes, or undefined when they would be more than `maxBytes` — known before any copy,
 * so a value too large to keep (10⁶ matrix draws: 800 MB) is not duplicated in memory only to be
 * thrown away (the sample cache's peak at 10⁶ draws was 1,607 MB against 1,382 MB without it).
 */
export function packValue(value: unknown, maxBytes = Infinity): Buffer | undefined {
  const arrays: Typed[] = [];
  let offset = 0;
  const encode = (v: unknown): unknown => {
    if (v === undefined) throw new NotData('undefined is not packed (JSON would write null)');
    if (v === null || typeof v === 'string' || typeof v === 'boolean') return v;
    if (typeof v === 'number') {
      if (Number.isNaN(v)) return { $n: 'NaN' };
      if (!Number.isFinite(v)) return { $n: v > 0 ? 'Infinity' : '-Infinity' };
      return Object.is(v, -0) ? { $n: '-0' } : v;
    }
    if (ArrayBuffer.isView(v)) {
      const name = v.constructor.name;
      if (!(name in TYPED)) throw new NotData(`a ${name} is not packed`);
      arrays.push(v as Typed);
      const at = offset;
      offset += pad8(v.byteLength);
      return { $t: name, at, n: (v as Typed).length };
    }
    if (Array.isArray(v)) return v.map(encode);
    if (typeof v === 'object' && Object.getPrototypeOf(v) === Object.prototype) {
      const out: Record<string, unknown> = {};
      for (const [key, item] of Object.entries(v as Record<string, unknown>)) {
        // `$…` keys mark encoded values; a tree with its own would be read back wrongly.
        if (key.startsWith('$')) throw new NotData(`key ${key} is not packed`);
        if (item !== undefined) out[key] = encode(item);
      }
      return out;
    }
    throw new NotData(`a ${typeof v} is not packed`);
  };
  const json = Buffer.from(JSON.stringify(encode(value)), 'utf8');
  const head = pad8(4 + json.length);
  if (head + offset > maxBytes) return undefined;
  const out = Buffer.alloc(head + offset);
  out.writeUInt32LE(json.length, 0);
  json.copy(out, 4);
  let at = head;
  for (const a of arrays) {
    out.set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength), at);
    at += pad8(a.byteLength);
  }
  return out;
}

/** The tree `packValue` wrote. Throws on bytes it did not write (a bad length, an array out of range). */
export function unpackValue(bytes: Uint8Array): unknown {
  const view = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const jsonLength = view.readUInt32LE(0);
  if (4 + jsonLength > view.length) throw new RangeError('packed value: JSON runs past the end');
  const head = pad8(4 + jsonLength);
  const decode = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map(decode);
    if (v === null || typeof v !== 'object') return v;
    const o = v as Record<string, unknown>;
    if (typeof o.$n === 'string') return o.$n === '-0' ? -0 : Number(o.$n);
    if (typeof o.$t === 'string') {
      const name = o.$t as TypedName;
      const Kind = TYPED[name];
      const n = o.n as number;
      const at = head + (o.at as number);
      if (!Kind || !Number.isInteger(n) || at + n * Kind.BYTES_PER_ELEMENT > view.length) throw new RangeError('packed value: an array out of range');
      const target = name === 'Float64Array' ? sharedFloat64(n) : new Kind(n);
      new Uint8Array(target.buffer, target.byteOffset, target.byteLength).set(view.subarray(at, at + target.byteLength));
      return target;
    }
    const out: Record<string, unknown> = {};
    for (const [key, item] of Object.entries(o)) out[key] = decode(item);
    return out;
  };
  return decode(JSON.parse(view.toString('utf8', 4, 4 + jsonLength)));
}
