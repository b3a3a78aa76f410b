import { zigguratNormals } from '../src/uncertainty/normal.js';
import type { RandomStream } from '../src/uncertainty/random.js';

/**
 * Invented landscapes with spatially correlated states, for the spatial bootstrap's checks.
 *
 * `smoothField`: white normal noise on a width × height grid smoothed by a Gaussian kernel of
 * standard deviation σ cells (separable, truncated at 4σ, weights scaled so the field has unit
 * variance). Its correlation at distance h is close to exp(−h² / 4σ²) (a Gaussian kernel convolved
 * with itself; the grid makes it approximate for small σ). Thresholded at 0 (the median), the
 * indicator's correlation is (2/π)·asin(ρ) (Sheppard 1899: P(both above the median) =
 * 1/4 + asin(ρ)/2π for a bivariate normal), so it falls to RANGE_CORRELATION where
 * ρ = sin(0.05·π/2): at h = 2σ·√(−ln sin(0.025π)) ≈ 3.19σ.
 */
export function smoothField(width: number, height: number, sigma: number, random: RandomStream): Float64Array {
  const reach = Math.ceil(4 * sigma);
  const weights = Array.from({ length: 2 * reach + 1 }, (_, n) => Math.exp(-((n - reach) ** 2) / (2 * sigma * sigma)));
  const norm = Math.sqrt(weights.reduce((a, w) => a + w * w, 0));
  const g = weights.map((w) => w / norm);
  const W = width + 2 * reach;
  const H = height + 2 * reach;
  const normal = zigguratNormals(() => random.uniform());
  const noise = new Float64Array(W * H);
  for (let n = 0; n < noise.length; n++) noise[n] = normal();
  const rows = new Float64Array(W * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < W; x++) {
    let sum = 0;
    for (let d = 0; d <= 2 * reach; d++) sum += g[d]! * noise[(y + d) * W + x]!;
    rows[y * W + x] = sum;
  }
  const field = new Float64Array(width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) {
    let sum = 0;
    for (let d = 0; d <= 2 * reach; d++) sum += g[d]! * rows[y * W + x + d]!;
    field[y * width + x] = sum;
  }
  return field;
}

/** The indicator range of a median-thresholded smoothField (see above): about 3.19σ. */
export function thresholdRange(sigma: number): number {
  return 2 * sigma * Math.sqrt(-Math.log(Math.sin(0.05 * Math.PI / 2)));
}

/** Standard normal CDF (Abramowitz & Stegun 1964, 7.1.26 via erf; absolute error below 1.5·10⁻⁷). */
export function normalCdf(z: number): number {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * x);
  const erf = 1 - (((((1.061405429 * t - 1.453152027) * t) + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return z >= 0 ? (1 + erf) / 2 : (1 - erf) / 2;
}

/** Grid positions (x, y per cell, cell side 1) in row-major cell order. */
export function gridPositions(width: number, height: number): Float64Array {
  const out = new Float64Array(2 * width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) out.set([x, y], 2 * (y * width + x));
  return out;
}
