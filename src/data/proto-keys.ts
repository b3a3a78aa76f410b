/**
 * A state may be called `__proto__`. The YAML reader keeps such a key as an own property, but zod
 * builds its output objects by assignment, and `out['__proto__'] = 0.5` sets no property at all:
 * the share silently vanished. So the key is renamed to a sentinel that no text file can contain
 * (NUL bytes are refused on reading) before validation, and named back afterwards.
 */
const PROTO = '__proto__';
const SHIELDED = '\u0000__proto__';

/** A copy of plain data with every own `__proto__` key renamed to the sentinel. */
export function shieldProtoKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(shieldProtoKeys);
  if (value === null || typeof value !== 'object') return value;
  const out: Record<string, unknown> = {};
  for (const [key, v] of Object.entries(value)) out[key === PROTO ? SHIELDED : key] = shieldProtoKeys(v);
  return out;
}

/** Undo shieldProtoKeys in validated data, defining `__proto__` as an ordinary own property. */
export function restoreProtoKeys<T>(value: T): T {
  if (Array.isArray(value)) return value.map(restoreProtoKeys) as T;
  if (value === null || typeof value !== 'object' || Object.getPrototypeOf(value) !== Object.prototype) return value;
  const out: Record<string, unknown> = {};
  for (const [key, v] of Object.entries(value)) {
    Object.defineProperty(out, key === SHIELDED ? PROTO : key, { value: restoreProtoKeys(v), enumerable: true, writable: true, configurable: true });
  }
  return out as T;
}

/** A key as the user wrote it (for messages and positions). */
export function userKey<K>(key: K): K {
  return (key === SHIELDED ? PROTO : key) as K;
}
