import { createHash } from 'node:crypto';
import { gammaVariates, type Elementary } from './gamma.js';
import { zigguratNormals } from './normal.js';
import { xoshiroUniforms } from './xoshiro.js';

import { LIMITS } from '../limits.js';

/** Largest seed a user may give (seeds are 1 … 2³² − 1). */
export const MAX_SEED = LIMITS.seed;

/**
 * The one way randomness travels in sere: a stream made once at the door (the CLI, from the
 * seed) and passed down; every consumer takes a named sub-stream of it, so that the same inputs
 * and seed give byte-identical output, and one consumer's draws never shift another's.
 *
 * Uniforms come from xoshiro256** (Blackman & Vigna 2021) with 53-bit resolution (`xoshiro.ts`);
 * gamma variates from Marsaglia & Tsang's (2000) method (`gamma.ts`, with the boost
 * Gamma(a) = Gamma(a + 1)·U^(1/a) for shape < 1) on ziggurat normals (Marsaglia & Tsang 2000,
 * `normal.ts`), all driven by the stream's own uniforms.
 *
 * Why these and not MT19937 with stdlib's gamma sampler (sere ≤ 0.4), measured with
 * `npm run bench -- sampling` (100,000 posterior draws of a 10-state matrix, 10⁷ gamma variates;
 * each in its own process, alternating, best of 3 each, on a loaded 2-core machine): 0.46–0.71 s
 * against 0.90–1.46 s, 1.8–2.3× faster. Of that, the generator: stdlib's MT19937 makes 53-bit
 * uniforms through two calls per number and a layered interface, where xoshiro256** fills a block of
 * 256 in one tight loop (a Marsaglia–Tsang gamma on MT19937 measured 1.5–2× slower than on it).
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
  const { uniform, gamma } = generatorOfKey(streamKey(seed, name));
  return {
    seed,
    name,
    uniform,
    integer: (n: number) => Math.floor(uniform() * n),
    gamma,
    stream: (child: string) => makeStream(seed, name === '' ? child : `${name}/${child}`),
  };
}

/**
 * The key of a named stream: the SHA-256 of seed and name as eight 32-bit words (little-endian),
 * which is the whole 256-bit state of the stream's xoshiro256** generator. A cryptographic hash
 * mixes every bit of the seed into every word, so nearby seeds (1, 2, … 9) give unrelated streams
 * — an earlier FNV-based derivation let a one-digit seed cancel against its own first character.
 */
export function streamKey(seed: number, name: string): Uint32Array {
  const digest = createHash('sha256').update(`sere-random:${seed}:${name}`).digest();
  const key = new Uint32Array(8);
  for (let w = 0; w < 8; w++) key[w] = digest.readUInt32LE(w * 4);
  return key;
}

/**
 * The key of a stream (its generator's whole starting state), to hand to another thread: a worker
 * receives numbers, not closures. `generatorOfKey` there gives the same numbers as `stream`.
 */
export function keyOf(stream: RandomStream): Uint32Array {
  return streamKey(stream.seed, stream.name);
}

/**
 * Uniforms and gamma variates of the stream whose key is `key[offset … offset+8)` (see keyOf); the
 * gamma's exp and log are Math's unless given (the year kernel's own, for the reference of its variates).
 */
export function generatorOfKey(key: Uint32Array, offset = 0, elementary?: Elementary): Pick<RandomStream, 'uniform' | 'gamma'> {
  const uniform = xoshiroUniforms(key.slice(offset, offset + 8));
  return { uniform, gamma: gammaVariates(uniform, zigguratNormals(uniform), elementary) };
}

/** A fresh seed for a run that named none; it is printed so the run can be repeated. */
export function freshSeed(): number {
  return 1 + Math.floor(Math.random() * (MAX_SEED - 1));
}
