import { createHash } from 'node:crypto';
import mt19937 from '@stdlib/random-base-mt19937';
import gammaRandom from '@stdlib/random-base-gamma';

import { LIMITS } from '../limits.js';

/** Largest seed a user may give (seeds are 1 … 2³² − 1, the range MT19937 takes as one number). */
export const MAX_SEED = LIMITS.seed;

/**
 * The one way randomness travels in sere: a stream made once at the door (the CLI, from the
 * seed) and passed down; every consumer takes a named sub-stream of it, so that the same inputs
 * and seed give byte-identical output, and one consumer's draws never shift another's.
 *
 * Uniforms come from MT19937 (Matsumoto & Nishimura 1998) with 53-bit resolution; gamma variates
 * from stdlib's Marsaglia & Tsang (2000) sampler driven by the same uniforms — for shape < 1 it
 * uses the boost Gamma(a) = Gamma(a + 1)·U^(1/a).
 */
export interface RandomStream {
  /** The run's seed, kept for reports only: never build randomness from it, take `stream(name)`. */
  readonly seed: number;
  /** The stream's name path from the root, e.g. `event:storm` or `hindcast:2019:3`. */
  readonly name: string;
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Uniform integer on 0 … n − 1. */
  integer(n: number): number;
  /** Gamma(shape, rate 1). */
  gamma(shape: number): number;
  /**
   * An independent sub-stream. The same name always gives the same stream from its start,
   * however much of this one has been used — so alternatives compared in one run that take
   * `stream('event:storm')` meet the same storm years (common random numbers).
   */
  stream(name: string): RandomStream;
}

/** The root stream of a run; made once, where the seed is chosen. */
export function randomStreams(seed: number): RandomStream {
  if (!Number.isInteger(seed) || seed < 1 || seed > MAX_SEED) {
    throw new RangeError(`seed must be a whole number from 1 to ${MAX_SEED}, got ${seed}`);
  }
  return makeStream(seed, '');
}

function makeStream(seed: number, name: string): RandomStream {
  // stdlib's type declarations omit `normalized` (documented: uniform on [0, 1) with 53-bit resolution).
  const generator = mt19937.factory({ seed: streamKey(seed, name) }) as unknown as { normalized: () => number };
  const uniform = generator.normalized;
  const gamma = gammaRandom.factory({ prng: uniform });
  return {
    seed,
    name,
    uniform,
    integer: (n: number) => Math.floor(uniform() * n),
    gamma: (shape: number) => gamma(shape, 1),
    stream: (child: string) => makeStream(seed, name === '' ? child : `${name}/${child}`),
  };
}

/**
 * The MT19937 key of a named stream: the SHA-256 of seed and name as eight 32-bit words, fed to
 * the generator's array initialisation (init_by_array). A cryptographic hash mixes every bit of
 * the seed into every word, so nearby seeds (1, 2, … 9) give unrelated streams — an earlier
 * FNV-based derivation let a one-digit seed cancel against its own first character.
 */
export function streamKey(seed: number, name: string): Uint32Array {
  const digest = createHash('sha256').update(`sere-random:${seed}:${name}`).digest();
  const key = new Uint32Array(8);
  for (let w = 0; w < 8; w++) key[w] = digest.readUInt32LE(w * 4);
  return key;
}

/** A fresh seed for a run that named none; it is printed so the run can be repeated. */
export function freshSeed(): number {
  return 1 + Math.floor(Math.random() * (MAX_SEED - 1));
}
