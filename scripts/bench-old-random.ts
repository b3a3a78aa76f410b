/**
 * The random stream of sere ≤ 0.4 — MT19937 uniforms (@stdlib/random-base-mt19937, keyed by the same
 * SHA-256 stream key) and stdlib's gamma sampler on them — kept only so `npm run bench` can time
 * posterior sampling before and after the change to xoshiro256** and a hand-written gamma sampler.
 */
import mt19937 from '@stdlib/random-base-mt19937';
import gammaRandom from '@stdlib/random-base-gamma';
import { streamKey, type RandomStream } from '../src/uncertainty/random.js';

export function oldRandomStreams(seed: number, name = ''): RandomStream {
  const generator = mt19937.factory({ seed: streamKey(seed, name) }) as unknown as { normalized: () => number };
  const uniform = generator.normalized;
  const gamma = gammaRandom.factory({ prng: uniform });
  return {
    seed,
    name,
    uniform,
    integer: (n: number) => Math.floor(uniform() * n),
    gamma: (shape: number) => gamma(shape, 1),
    stream: (child: string) => oldRandomStreams(seed, name === '' ? child : `${name}/${child}`),
  };
}
