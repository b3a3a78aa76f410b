import gammainc from '@stdlib/math-base-special-gammainc';
import { describe, expect, it } from 'vitest';
import { X, ZIGGURAT_LAYERS, ZIGGURAT_R, ZIGGURAT_V, zigguratNormals } from '../../src/uncertainty/normal.js';
import { generatorOfKey, keyOf, randomStreams } from '../../src/uncertainty/random.js';

/** Φ(x) through the regularised incomplete gamma function: P(|Z| ≤ |x|) = P(1/2, x²/2). */
const phi = (x: number): number => 0.5 + 0.5 * Math.sign(x) * gammainc((x * x) / 2, 0.5);
const density = (x: number): number => Math.exp(-0.5 * x * x);

function normalsOf(seed: number, name: string, n: number): Float64Array {
  const { uniform } = generatorOfKey(keyOf(randomStreams(seed).stream(name)));
  const normal = zigguratNormals(uniform);
  return Float64Array.from({ length: n }, normal);
}

describe('ziggurat normals (Marsaglia & Tsang 2000, 256 strips)', () => {
  it('builds strips of equal area V that close at x = 0, and a base strip of area V with the tail', () => {
    // Top strip: X[255] wide, from f(X[255]) up to f(0) = 1.
    expect(Math.abs(X[ZIGGURAT_LAYERS - 1]! * (1 - density(X[ZIGGURAT_LAYERS - 1]!)) - ZIGGURAT_V) / ZIGGURAT_V).toBeLessThan(1e-8);
    // Base strip: the rectangle [0, R] × [0, f(R)] plus ∫_R^∞ exp(−x²/2) dx = √(2π)·(1 − Φ(R)) = √(2π)·Q(1/2, R²/2)/2.
    const tail = Math.sqrt(2 * Math.PI) * 0.5 * gammainc((ZIGGURAT_R * ZIGGURAT_R) / 2, 0.5, true, true);
    expect(Math.abs(ZIGGURAT_R * density(ZIGGURAT_R) + tail - ZIGGURAT_V) / ZIGGURAT_V).toBeLessThan(1e-8);
    // Every strip between has area V: X[i]·(f(X[i+1]) − f(X[i])) = V.
    for (let i = 1; i < ZIGGURAT_LAYERS - 1; i++) {
      expect(Math.abs(X[i]! * (density(X[i + 1]!) - density(X[i]!)) - ZIGGURAT_V) / ZIGGURAT_V).toBeLessThan(1e-9);
    }
  });

  it('passes a one-sample Kolmogorov–Smirnov test against Φ on 200,000 draws (α = 0.001)', () => {
    // Critical D at α = 0.001 from the asymptotic Kolmogorov distribution: 1.9495/√n (K₀.₉₉₉, from
    // memory of the standard table; scipy.stats.kstwobign.ppf(0.999) = 1.94947…). False alarm 0.001.
    const n = 200_000;
    const x = normalsOf(2024, 'normal-ks', n).sort();
    let d = 0;
    for (let i = 0; i < n; i++) {
      const f = phi(x[i]!);
      d = Math.max(d, (i + 1) / n - f, f - i / n);
    }
    expect(d).toBeLessThan(1.9495 / Math.sqrt(n));
  });

  it('puts the right share beyond R (the tail method) and inside each wedge-heavy region, within 4 SE', () => {
    // KS barely sees the tail; count it: P(|Z| > R) = 1 − P(1/2, R²/2) ≈ 2.6e-4, a Binomial count.
    // Also |Z| in the top strip [0, X[255]] and between X[2] and R (strips where wedges are tried
    // most often). Three checks at 4 SE: false alarm about 2e-4 in all.
    const n = 1_000_000;
    const x = normalsOf(7, 'normal-tail', n);
    // P(|Z| > x) = Q(1/2, x²/2), the upper regularised incomplete gamma function.
    const above = (x: number): number => (x === Infinity ? 0 : gammainc((x * x) / 2, 0.5, true, true));
    const share = (lo: number, hi: number): number => above(lo) - above(hi);
    for (const [lo, hi] of [[ZIGGURAT_R, Infinity], [0, X[ZIGGURAT_LAYERS - 1]!], [X[2]!, ZIGGURAT_R]] as const) {
      let count = 0;
      for (let i = 0; i < n; i++) { const a = Math.abs(x[i]!); if (a > lo && a <= hi) count++; }
      const p = share(lo, hi);
      expect(Math.abs(count - n * p), `|Z| in (${lo}, ${hi}]`).toBeLessThan(4 * Math.sqrt(n * p * (1 - p)));
    }
  });

  it('has mean 0, variance 1 and fourth moment 3 over 1,000,000 draws (4 SE each)', () => {
    const n = 1_000_000;
    const x = normalsOf(99, 'normal-moments', n);
    let m1 = 0; let m2 = 0; let m4 = 0;
    for (let i = 0; i < n; i++) { const z = x[i]!; m1 += z; m2 += z * z; m4 += z ** 4; }
    m1 /= n; m2 /= n; m4 /= n;
    // SE: mean 1/√n; second moment √(2/n); fourth moment √((105 − 9)/n) (E z⁸ = 105).
    expect(Math.abs(m1)).toBeLessThan(4 / Math.sqrt(n));
    expect(Math.abs(m2 - 1)).toBeLessThan(4 * Math.sqrt(2 / n));
    expect(Math.abs(m4 - 3)).toBeLessThan(4 * Math.sqrt(96 / n));
  });
});
