import mt19937 from '@stdlib/random-base-mt19937';
import gammaRandom from '@stdlib/random-base-gamma';

/** Largest seed the Mersenne Twister accepts (seeds are 1 … 2³² − 1). */
export const MAX_SEED = 4294967295;

/**
 * The one source of randomness, made once in the CLI layer from the seed and handed to every
 * sampler, so that the same inputs and seed give byte-identical output.
 *
 * Uniforms come from MT19937 (Matsumoto & Nishimura 1998) with 53-bit resolution; gamma variates
 * from stdlib's Marsaglia & Tsang (2000) sampler driven by the same uniforms — for shape < 1 it
 * uses the boost Gamma(a) = Gamma(a + 1)·U^(1/a).
 */
export interface RandomSource {
  readonly seed: number;
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Uniform integer on 0 … n − 1. */
  integer(n: number): number;
  /** Gamma(shape, rate 1). */
  gamma(shape: number): number;
}

export function seededRandom(seed: number): RandomSource {
  if (!Number.isInteger(seed) || seed < 1 || seed > MAX_SEED) {
    throw new RangeError(`seed must be a whole number from 1 to ${MAX_SEED}, got ${seed}`);
  }
  // stdlib's type declarations omit `normalized` (documented: uniform on [0, 1) with 53-bit resolution).
  const generator = mt19937.factory({ seed }) as unknown as { normalized: () => number };
  const uniform = generator.normalized;
  const gamma = gammaRandom.factory({ prng: uniform });
  return {
    seed,
    uniform,
    integer: (n: number) => Math.floor(uniform() * n),
    gamma: (shape: number) => gamma(shape, 1),
  };
}

/** A fresh seed for a run that named none; it is printed so the run can be repeated. */
export function freshSeed(): number {
  return 1 + Math.floor(Math.random() * (MAX_SEED - 1));
}

/**
 * A seed for a named sub-stream (an event's years, the plot simulation), derived from the run's
 * seed with FNV-1a (Fowler, Noll & Vo) over the name. Alternatives compared in one run draw a named
 * stream identically, which gives them common random numbers: the same storm years for all.
 */
export function deriveSeed(seed: number, name: string): number {
  let h = 0x811c9dc5 ^ seed;
  for (const ch of `${seed}:${name}`) {
    h ^= ch.codePointAt(0)!;
    h = Math.imul(h, 0x01000193);
  }
  return 1 + ((h >>> 0) % MAX_SEED);
}
