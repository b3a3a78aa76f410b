/**
 * How far apart sites must be before their states stop resembling each other: the range of
 * spatial autocorrelation of the latest survey's states, which sets the side of the spatial
 * bootstrap's blocks (spatial-blocks.ts).
 *
 * The statistic is the indicator correlogram (Journel 1983, indicator variograms) pooled over the
 * states: for sites a, b in a distance class,
 *
 *   ρ(h) = Σ_pairs Σ_s (I_s(a) − p_s)(I_s(b) − p_s) / (N_h · Σ_s p_s(1 − p_s)),
 *
 * where I_s is the indicator of state s and p_s its share — for two states, Moran's (1950)
 * autocorrelation of the indicator by distance class. Per pair the inner sum is
 * [same state] − p_{s(a)} − p_{s(b)} + Σ p², so each pair costs a few operations.
 *
 * Classes are centred on multiples of the spacing w (the median nearest-neighbour distance;
 * the grid's cell side on a grid), class c covering ((c − ½)w, (c + ½)w], and only lags up to half
 * the largest distance are used (common practice: Journel & Huijbregts 1978, ch. III, the "half
 * the field" rule). The range is the smallest lag at which ρ falls below RANGE_CORRELATION (0.05),
 * interpolated linearly between class centres from ρ(0) = 1 — the same level that defines an
 * exponential model's practical range (95% of the sill; Journel & Huijbregts 1978).
 */

/** The correlation at which two sites count as unrelated: 5% of the sill, the practical range's level. */
export const RANGE_CORRELATION = 0.05;

/** Above this many sites, every m-th site (in the fit's site order) is used: pairs grow as n². */
export const RANGE_MAX_SITES = 4000;

export interface RangeEstimate {
  /** The range in projected units; the largest lag used when ρ never fell below the level. */
  readonly range: number;
  /** Whether ρ fell below the level within the lags used (false: the range is at least `range`). */
  readonly reached: boolean;
  /** The spacing w: width of the distance classes. */
  readonly spacing: number;
  /** Sites used (after thinning). */
  readonly sites: number;
  /** The correlogram: class centres and ρ there (NaN for a class with no pairs). */
  readonly lags: readonly number[];
  readonly correlation: readonly number[];
}

/**
 * The range of the states at `positions` (x, y per site) in states `state` (0 … k − 1), or
 * undefined when fewer than two states are present (then no correlation can be measured).
 */
export function estimateRange(positions: Float64Array, state: ArrayLike<number>, k: number): RangeEstimate | undefined {
  const all = state.length;
  const every = Math.ceil(all / RANGE_MAX_SITES);
  const n = Math.ceil(all / every);
  const xs = new Float64Array(n);
  const ys = new Float64Array(n);
  const ss = new Int32Array(n);
  for (let m = 0; m < n; m++) {
    xs[m] = positions[2 * m * every]!;
    ys[m] = positions[2 * m * every + 1]!;
    ss[m] = state[m * every]!;
  }
  const share = new Float64Array(k);
  for (let m = 0; m < n; m++) share[ss[m]!] += 1 / n;
  let sumSquares = 0;
  let variance = 0;
  for (const p of share) {
    sumSquares += p * p;
    variance += p * (1 - p);
  }
  if (n < 2 || variance <= 0) return undefined;
  const spacing = medianNearest(xs, ys);
  // The box's diagonal for the largest distance (equal on a full grid; never shorter).
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (let m = 0; m < n; m++) {
    x0 = Math.min(x0, xs[m]!); x1 = Math.max(x1, xs[m]!);
    y0 = Math.min(y0, ys[m]!); y1 = Math.max(y1, ys[m]!);
  }
  const longest = Math.sqrt((x1 - x0) ** 2 + (y1 - y0) ** 2);
  const classes = Math.max(1, Math.floor(longest / 2 / spacing + 0.5));
  const sum = new Float64Array(classes + 1);
  const pairs = new Float64Array(classes + 1);
  for (let a = 0; a < n; a++) {
    const pa = share[ss[a]!]!;
    const xa = xs[a]!;
    const ya = ys[a]!;
    for (let b = a + 1; b < n; b++) {
      const dx = xs[b]! - xa;
      const dy = ys[b]! - ya;
      const c = Math.round(Math.sqrt(dx * dx + dy * dy) / spacing);
      if (c < 1 || c > classes) continue;
      sum[c] += (ss[a] === ss[b] ? 1 : 0) - pa - share[ss[b]!]! + sumSquares;
      pairs[c] += 1;
    }
  }
  const lags: number[] = [];
  const correlation: number[] = [];
  for (let c = 1; c <= classes; c++) {
    lags.push(c * spacing);
    correlation.push(pairs[c]! > 0 ? sum[c]! / (pairs[c]! * variance) : Number.NaN);
  }
  let lastLag = 0;
  let lastRho = 1;
  for (let c = 0; c < lags.length; c++) {
    const rho = correlation[c]!;
    if (Number.isNaN(rho)) continue;
    if (rho < RANGE_CORRELATION) {
      const range = lastLag + (lags[c]! - lastLag) * (lastRho - RANGE_CORRELATION) / (lastRho - rho);
      return { range, reached: true, spacing, sites: n, lags, correlation };
    }
    lastLag = lags[c]!;
    lastRho = rho;
  }
  return { range: lastLag || spacing, reached: false, spacing, sites: n, lags, correlation };
}

/**
 * The mean edge distance m of a correlogram, in projected units: how far across a block edge the
 * lost covariance reaches, Σ_k |k_x| ρ(k) / Σ_k ρ(k) over the lattice lags k (ρ(0) = 1). The block
 * bootstrap's variance of a mean is biased low by −(1/ℓ) Σ_k |k| γ(k) per dimension for blocks of
 * length ℓ (Künsch 1989; Lahiri 2003, ch. 3, the first-order bias of block variance estimators),
 * so square blocks of side ℓ keep about (1 − m/ℓ)² of the variance (bootstrap.ts undoes that).
 * For an isotropic ρ on a grid of spacing w, with about 2πc lags in the class at c·w:
 * m = w · 4 Σ_c c² ρ_c / (1 + 2π Σ_c c ρ_c), summed over the classes up to the first with ρ ≤ 0
 * (beyond it the correlogram is noise). A Gaussian correlation exp(−h²/4σ²) gives m ≈ 2σ/√π.
 */
export function edgeLag(estimate: Pick<RangeEstimate, 'lags' | 'correlation' | 'spacing'>): number {
  let num = 0;
  let den = 1;
  for (let c = 0; c < estimate.lags.length; c++) {
    const rho = estimate.correlation[c]!;
    if (Number.isNaN(rho)) continue;
    if (rho <= 0) break;
    const lag = estimate.lags[c]! / estimate.spacing;
    num += 4 * lag * lag * rho;
    den += 2 * Math.PI * lag * rho;
  }
  return (num / den) * estimate.spacing;
}

/**
 * The median distance from a site to its nearest other site (on a grid: the cell side), found on a
 * grid of buckets so it is not n². Sites at one position are skipped (distance 0 says nothing of spacing).
 */
export function medianNearest(xs: Float64Array, ys: Float64Array): number {
  const n = xs.length;
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (let m = 0; m < n; m++) {
    x0 = Math.min(x0, xs[m]!); x1 = Math.max(x1, xs[m]!);
    y0 = Math.min(y0, ys[m]!); y1 = Math.max(y1, ys[m]!);
  }
  const extent = Math.max(x1 - x0, y1 - y0);
  if (!(extent > 0)) return 1;
  const side = Math.max(1, Math.ceil(Math.sqrt(n)));
  const cell = extent / side + Number.EPSILON * extent;
  const buckets = new Map<number, number[]>();
  const keyOf = (cx: number, cy: number): number => cx * (side + 3) + cy;
  for (let m = 0; m < n; m++) {
    const key = keyOf(Math.floor((xs[m]! - x0) / cell), Math.floor((ys[m]! - y0) / cell));
    const list = buckets.get(key);
    if (list) list.push(m); else buckets.set(key, [m]);
  }
  const nearest: number[] = [];
  for (let m = 0; m < n; m++) {
    const cx = Math.floor((xs[m]! - x0) / cell);
    const cy = Math.floor((ys[m]! - y0) / cell);
    let best = Infinity;
    // Widen the ring of buckets until the best found is closer than any unsearched bucket.
    for (let r = 1; r <= side + 1 && best > (r - 1) * cell; r++) {
      for (let dx = -r; dx <= r; dx++) for (let dy = -r; dy <= r; dy++) {
        if (r > 1 && Math.max(Math.abs(dx), Math.abs(dy)) < r) continue;
        for (const o of buckets.get(keyOf(cx + dx, cy + dy)) ?? []) {
          const d = Math.sqrt((xs[o]! - xs[m]!) ** 2 + (ys[o]! - ys[m]!) ** 2);
          if (o !== m && d > 0 && d < best) best = d;
        }
      }
    }
    if (best < Infinity) nearest.push(best);
  }
  if (nearest.length === 0) return 1;
  nearest.sort((a, b) => a - b);
  return nearest[nearest.length >> 1]!;
}
