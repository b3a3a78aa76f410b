/**
 * Uniforms on [0, 1) from xoshiro256** (Blackman & Vigna 2021, "Scrambled linear pseudorandom number
 * generators", ACM TOMS 47(4):36), as its authors convert them: the top 53 bits of each 64-bit
 * output times 2⁻⁵³. Period 2²⁵⁶ − 1; every bit passes BigCrush.
 *
 * The 256-bit state is `key` read as four little-endian 64-bit words (key[0] the low half of the
 * first) — here the SHA-256 of seed and stream name, a full-entropy key, so no seeding generator
 * is needed; the one forbidden state, all zeros, is replaced by a fixed one.
 *
 * JavaScript has no 64-bit integers that are fast, so each word is two 32-bit halves; the
 * generator fills a block of BLOCK uniforms at a time with its state in local variables and hands
 * them out one by one. Why this and not MT19937: see `random.ts` (measured).
 */
export function xoshiroUniforms(key: Uint32Array): () => number {
  const w = xoshiroStart(key);
  // [hi, lo] of s0, s1, s2, s3.
  const s = Int32Array.of(w[1]!, w[0]!, w[3]!, w[2]!, w[5]!, w[4]!, w[7]!, w[6]!);
  const block = new Float64Array(BLOCK);
  let next = BLOCK;

  const refill = (): void => {
    let s0h = s[0]!, s0l = s[1]!, s1h = s[2]!, s1l = s[3]!, s2h = s[4]!, s2l = s[5]!, s3h = s[6]!, s3l = s[7]!;
    for (let n = 0; n < BLOCK; n++) {
      // result = rotl(s1 · 5, 7) · 9, each product mod 2⁶⁴: low half exact in a double, carry to the high half.
      let p = (s1l >>> 0) * 5;
      let lo = p | 0;
      let hi = (Math.imul(s1h, 5) + Math.floor(p / 4294967296)) | 0;
      const rh = (hi << 7) | (lo >>> 25);
      const rl = (lo << 7) | (hi >>> 25);
      p = (rl >>> 0) * 9;
      lo = p | 0;
      hi = (Math.imul(rh, 9) + Math.floor(p / 4294967296)) | 0;
      block[n] = ((hi >>> 0) * 2097152 + (lo >>> 11)) * 1.1102230246251565e-16; // (result >> 11) · 2⁻⁵³
      // t = s1 << 17; s2 ^= s0; s3 ^= s1; s1 ^= s2; s0 ^= s3; s2 ^= t; s3 = rotl(s3, 45).
      const th = (s1h << 17) | (s1l >>> 15);
      const tl = s1l << 17;
      s2h ^= s0h; s2l ^= s0l;
      s3h ^= s1h; s3l ^= s1l;
      s1h ^= s2h; s1l ^= s2l;
      s0h ^= s3h; s0l ^= s3l;
      s2h ^= th; s2l ^= tl;
      const xh = s3h;
      const xl = s3l;
      s3h = (xl << 13) | (xh >>> 19); // rotl 45 = swap the halves, then rotl 13
      s3l = (xh << 13) | (xl >>> 19);
    }
    s[0] = s0h; s[1] = s0l; s[2] = s1h; s[3] = s1l; s[4] = s2h; s[5] = s2l; s[6] = s3h; s[7] = s3l;
    next = 0;
  };

  return () => {
    if (next === BLOCK) refill();
    return block[next++]!;
  };
}

/**
 * The generator's starting state from a key: the key itself (four little-endian 64-bit words, low
 * half first), except that the forbidden all-zero state becomes s0 = 1. The WebAssembly year kernel
 * (year-kernel.ts) starts its streams from these same words.
 */
export function xoshiroStart(key: ArrayLike<number>): Uint32Array {
  if (key.length !== 8) throw new Error('xoshiro256** takes a key of eight 32-bit words');
  const w = Uint32Array.from(key);
  if (w.every((x) => x === 0)) w[0] = 1;
  return w;
}

/** Uniforms made per refill: large enough to amortise the call, small enough for a stream used once. */
const BLOCK = 256;
