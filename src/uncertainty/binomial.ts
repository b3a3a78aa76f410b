import type { RandomStream } from './random.js';

/**
 * Mean n·min(p, 1 − p) from which BTPE is used; below it, inversion. Kachitvichyanukul & Schmeiser
 * (1988) give BTPE for n·min(p, 1 − p) ≥ 10 (its triangle needs p₁ > 0; inversion's expected
 * search is n·p + 1 steps, cheap below 10).
 */
export const BTPE_FROM = 10;

/**
 * Binomial(n, p), exactly: by inversion (sequential search from 0 through the pmf, one uniform)
 * when n·min(p, 1 − p) < 10, else by BTPE (Kachitvichyanukul & Schmeiser 1988, "Binomial random
 * variate generation", CACM 31(2):216–222: triangle, parallelogram and exponential tails over the
 * pmf, accepted against it — explicitly near the mode, by a squeeze, or through Stirling's series
 * with four correction terms), about two uniforms a variate whatever n. Both for p ≤ ½; p > ½
 * draws n − Binomial(n, 1 − p). One trial is one Bernoulli trial (U < p), which categorical.ts
 * takes as Multinomial(1, ·).
 *
 * Written here, not taken from @stdlib/random-base-binomial 0.2.2 (sere ≤ 0.4), because that
 * sampler is biased once n·min(p, 1 − p) ≥ 10 — measured over 200,000 draws on its own generator:
 * Binomial(42, 0.7) mean 28.85 (true 29.4), Binomial(20, 0.5) mean 10.55 (true 10), both more
 * than 80 standard errors off (test/uncertainty/binomial.test.ts checks this sampler's whole
 * distribution against the pmf on both sides of the switch). BTPE and inversion replaced Beta
 * order-statistic splitting (Knuth, TAOCP vol. 2, §3.4.1 F; until this change), also exact, because
 * splitting took a pair of gamma variates per halving and up to 16 Bernoulli uniforms — tens of
 * uniforms a binomial. Measured on `npm run bench -- plots` (5,000 sites as plots, 4,000 draws × 30
 * years, about 3.6 M binomials; 2 shared cores at load 9–10, builds alternated): the uniforms'
 * refill, the splitting loop and the gamma variates were about two thirds of the CPU profile; the
 * forecast's CPU fell from 11.6–13.5 s to 3.7–4.6 s, the bench's warm wall from 23.4 s to 5.3 s
 * (DEVELOPERS.md, Benchmarks).
 *
 * The plot step (engine/plot-counts.ts) draws these same binomials in WebAssembly
 * (assembly/year-kernel.ts `binomial`, `inversion`, `btpe`: every operation here in the same order,
 * the host's exp, log and log1p), bit for bit (test/uncertainty/plot-kernel.test.ts); a change here
 * is a change there. This one serves every other multinomial and is the kernel's reference.
 */
export function binomialSampler(random: Pick<RandomStream, 'uniform'>): (n: number, p: number) => number {
  const { uniform } = random;
  return (n, p) => {
    if (n <= 0 || p <= 0) return 0;
    if (p >= 1) return n;
    if (n === 1) return uniform() < p ? 1 : 0;
    const flip = p > 0.5;
    const r = flip ? 1 - p : p;
    const x = n * r < BTPE_FROM ? inversion(uniform, n, r) : btpe(uniform, n, r);
    return flip ? n - x : x;
  };
}

/**
 * Inversion for p ≤ ½, n·p < 10: the first x whose cumulative pmf passes U, the pmf by its
 * recurrence f(x) = f(x − 1)·(n − x + 1)/x · p/q from f(0) = qⁿ. Should rounding leave U above the
 * pmf's total, the search starts again on a fresh uniform (a chance of order 10⁻¹⁵).
 */
function inversion(uniform: () => number, n: number, p: number): number {
  const q = 1 - p;
  const ratio = p / q;
  const first = Math.exp(n * Math.log1p(-p));
  for (;;) {
    let u = uniform();
    let f = first;
    let x = 0;
    while (u >= f) {
      u -= f;
      x += 1;
      if (x > n) break;
      f *= ((n - x + 1) / x) * ratio;
    }
    if (x <= n) return x;
  }
}

/**
 * One term of Stirling's series for ln x! beyond its leading terms, 1/(12x) − 1/(360x³) + 1/(1260x⁵)
 * − 1/(1680x⁷) + 1/(1188x⁹), nested over 166320 = lcm of the denominators as the paper writes it
 * (13860 = 166320/12; some later copies of the method print 13680).
 */
function stirlingTail(x: number): number {
  const x2 = x * x;
  return (13860 - (462 - (132 - (99 - 140 / x2) / x2) / x2) / x2) / x / 166320;
}

/**
 * ln(f(y)/f(M)) for Binomial(n, p), f its pmf and M its mode m, by Stirling's formula (BTPE step
 * 5.3). M! and (n − M)! stand in the numerator, y! and (n − y)! in the denominator, so their series
 * tails enter with + and − signs: the paper prints all four with +, an error that accepted draws
 * with 20 < |y − M| < npq/2 − 1 about 0.2% too often (found by an independent audit against
 * scipy: ln f(79)/f(100) at n = 200, p = ½ came out 3.5·10⁻³ high; with these signs it is exact to
 * 10⁻¹³; GSL's binomial_tpe.c has the same signs). Exported for its test.
 */
export function logRatioToMode(n: number, p: number, m: number, y: number): number {
  const q = 1 - p;
  const xm = m + 0.5;
  const x1 = y + 1;
  const f1 = m + 1;
  const z = n + 1 - m;
  const w = n - y + 1;
  return xm * Math.log(f1 / x1) + (n - m + 0.5) * Math.log(z / w) + (y - m) * Math.log((w * p) / (x1 * q)) +
    stirlingTail(f1) + stirlingTail(z) - stirlingTail(x1) - stirlingTail(w);
}

/** BTPE for p ≤ ½, n·p ≥ 10: Kachitvichyanukul & Schmeiser (1988), steps 0–5.3, with their constants. */
function btpe(uniform: () => number, n: number, p: number): number {
  // Step 0: the mode M, the triangle's half-width p₁ around xM, the parallelogram's c, the tails' rates λ.
  const q = 1 - p;
  const fm = n * p + p;
  const m = Math.floor(fm);
  const npq = n * p * q;
  const p1 = Math.floor(2.195 * Math.sqrt(npq) - 4.6 * q) + 0.5;
  const xm = m + 0.5;
  const xl = xm - p1;
  const xr = xm + p1;
  const c = 0.134 + 20.5 / (15.3 + m);
  let a = (fm - xl) / (fm - xl * p);
  const lambdaL = a * (1 + a / 2);
  a = (xr - fm) / (xr * q);
  const lambdaR = a * (1 + a / 2);
  const p2 = p1 * (1 + 2 * c);
  const p3 = p2 + c / lambdaL;
  const p4 = p3 + c / lambdaR;
  for (;;) {
    // Step 1: which region; the triangle (most draws) is accepted outright.
    const u = uniform() * p4;
    let v = uniform();
    if (u <= p1) return Math.floor(xm - p1 * v + u);
    let y: number;
    if (u <= p2) {
      // Step 2: the parallelogram.
      const x = xl + (u - p1) / c;
      v = v * c + 1 - Math.abs(m - x + 0.5) / p1;
      if (v > 1) continue;
      y = Math.floor(x);
    } else if (u <= p3) {
      // Step 3: the left exponential tail (v = 0 gives −∞: rejected).
      y = Math.floor(xl + Math.log(v) / lambdaL);
      if (y < 0) continue;
      v *= (u - p2) * lambdaL;
    } else {
      // Step 4: the right exponential tail.
      y = Math.floor(xr - Math.log(v) / lambdaR);
      if (y > n) continue;
      v *= (u - p3) * lambdaR;
    }
    // Step 5: accept y with chance f(y)/f(M) over the envelope's v.
    const k = Math.abs(y - m);
    if (k <= 20 || k >= npq / 2 - 1) {
      // 5.1: f(y)/f(M) by the pmf's recurrence.
      const s = p / q;
      const as = s * (n + 1);
      let f = 1;
      if (m < y) for (let i = m + 1; i <= y; i++) f *= as / i - s;
      else if (m > y) for (let i = y + 1; i <= m; i++) f /= as / i - s;
      if (v <= f) return y;
      continue;
    }
    // 5.2: squeeze on ln v from the normal approximation's bounds.
    const rho = (k / npq) * ((k * (k / 3 + 0.625) + 1 / 6) / npq + 0.5);
    const t = -k * k / (2 * npq);
    const logV = Math.log(v);
    if (logV < t - rho) return y;
    if (logV > t + rho) continue;
    // 5.3: ln(f(y)/f(M)) through Stirling's formula.
    if (logV <= logRatioToMode(n, p, m, y)) return y;
  }
}
