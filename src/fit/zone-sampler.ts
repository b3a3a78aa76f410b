/**
 * What the partial-pooling sampler of a zoned fit (uncertainty/zone-posterior.ts) says about its own
 * convergence: split-R̂ and bulk ESS (Vehtari et al. 2021, uncertainty/mcmc-diagnostics.ts) of
 * every quantity it moves, computed over its chains. Data, not randomness: `sere fit` runs the
 * sampler once with its seed and keeps this in the fit (file key `zones.posterior_sampler`).
 *
 * The quantities, NaN where one never varies (a row with one possible cell, a structural zero):
 * - `kappa`: per from-state, log κᵢ (R̂ and ESS of the bulk are rank-based, so log κ and κ agree;
 *   the folded R̂ is taken on log κ, where a row whose likelihood rises to κ = ∞ has the prior's
 *   tail, exponential in log κ, rather than κ's, which has no mean);
 * - `shared`: k×k, the shared row's cells pᵢⱼ;
 * - `zones`: Z×k×k, each zone's row given the sweep's state, E[θ_zij | κ, p, c] =
 *   (κᵢpᵢⱼ + c_zij)/(κᵢ + C_zi) with c_z the zone's (completed) counts — the Rao-Blackwellised
 *   zone cell, so diagnosing it takes no extra random numbers.
 */
export interface ZoneSamplerRun {
  readonly seed: number;
  readonly chains: number;
  /** Sweeps dropped per chain. */
  readonly warmUp: number;
  /** Sweeps kept per chain after the warm-up, every `thin`-th. */
  readonly kept: number;
  readonly thin: number;
  /** True when the zones have pairs further apart than one step (data augmentation over their bridges). */
  readonly augmented: boolean;
  readonly kappa: Diagnostics;
  readonly shared: Diagnostics;
  readonly zones: Diagnostics;
}

export interface Diagnostics {
  readonly rhat: Float64Array;
  readonly ess: Float64Array;
}

/** R̂ above this is a warning (Vehtari et al. 2021; the same thresholds as the gap sampler's). */
export const ZONE_RHAT_WARNING = 1.01;
/** A bulk effective sample size below this is a warning (Vehtari et al. 2021). */
export const ZONE_ESS_WARNING = 400;

/** Where a diagnostic was worst: which quantity, and its value. */
export interface ZoneSamplerWarning {
  /** `rhat` or `ess`. */
  readonly key: 'rhat' | 'ess';
  /** `kappa`, `shared` or `zones`, and the state (and zone) indices within it. */
  readonly quantity: 'kappa' | 'shared' | 'zones';
  readonly zone?: number;
  readonly from: number;
  readonly to?: number;
  readonly value: number;
  readonly line: string;
}

/**
 * The warnings a run earns: the largest R̂ above ZONE_RHAT_WARNING and the smallest ESS below
 * ZONE_ESS_WARNING, each naming its quantity (at most one of each; none when the run passes).
 */
export function zoneSamplerWarnings(run: ZoneSamplerRun, states: readonly string[], zoneNames: readonly string[]): ZoneSamplerWarning[] {
  const out: ZoneSamplerWarning[] = [];
  const rhat = worst(run, 'rhat', (x) => x > ZONE_RHAT_WARNING, (a, b) => a > b);
  const ess = worst(run, 'ess', (x) => x < ZONE_ESS_WARNING, (a, b) => a < b);
  const k = states.length;
  const name = (w: Worst): string => zoneQuantityName(w, states, zoneNames);
  const place = (w: Worst): Pick<ZoneSamplerWarning, 'quantity' | 'zone' | 'from' | 'to'> => {
    if (w.quantity === 'kappa') return { quantity: 'kappa', from: w.index };
    const cell = w.index % (k * k);
    return { quantity: w.quantity, ...(w.quantity === 'zones' ? { zone: Math.floor(w.index / (k * k)) } : {}), from: Math.floor(cell / k), to: cell % k };
  };
  if (rhat) {
    out.push({ key: 'rhat', ...place(rhat), value: rhat.value,
      line: `zone sampler: R̂ ${rhat.value.toFixed(4)} for ${name(rhat)} (above ${ZONE_RHAT_WARNING}): its chains disagree; the zones' posterior draws are not yet to be trusted — compare with a refit under another --seed (the zone sampler's length is not a setting)` });
  }
  if (ess) {
    out.push({ key: 'ess', ...place(ess), value: ess.value,
      line: `zone sampler: effective sample size ${Math.round(ess.value)} for ${name(ess)} (below ${ZONE_ESS_WARNING}): the zones' bands rest on few independent draws — compare with a refit under another --seed` });
  }
  return out;
}

/** A quantity in words: `κ of STATE`, `shared A→B`, `zone NAME A→B`. */
export function zoneQuantityName(w: Pick<Worst, 'quantity' | 'index'>, states: readonly string[], zoneNames: readonly string[]): string {
  const k = states.length;
  if (w.quantity === 'kappa') return `κ of ${states[w.index]}`;
  const cell = w.index % (k * k);
  const arrow = `${states[Math.floor(cell / k)]}→${states[cell % k]}`;
  return w.quantity === 'shared' ? `shared ${arrow}` : `zone ${zoneNames[Math.floor(w.index / (k * k))]} ${arrow}`;
}

export interface Worst {
  readonly quantity: 'kappa' | 'shared' | 'zones';
  readonly index: number;
  readonly value: number;
}

function worst(run: ZoneSamplerRun, key: 'rhat' | 'ess', flagged: (x: number) => boolean, better: (a: number, b: number) => boolean): Worst | undefined {
  let found: Worst | undefined;
  for (const quantity of ['kappa', 'shared', 'zones'] as const) {
    const values = run[quantity][key];
    for (let i = 0; i < values.length; i++) {
      const x = values[i]!;
      if (Number.isFinite(x) && flagged(x) && (!found || better(x, found.value))) found = { quantity, index: i, value: x };
    }
  }
  return found;
}

/** Where R̂ is largest (key rhat) or the ESS smallest (ess), whether or not past its threshold. */
export function zoneSamplerWorst(run: ZoneSamplerRun, key: 'rhat' | 'ess'): Worst | undefined {
  return key === 'rhat' ? worst(run, key, () => true, (a, b) => a > b) : worst(run, key, () => true, (a, b) => a < b);
}

/** The largest R̂ and smallest ESS of a run over every quantity (null when nothing varies). */
export function zoneSamplerExtremes(run: ZoneSamplerRun): { readonly rhatMax: number | null; readonly essMin: number | null } {
  let rhatMax: number | null = null;
  let essMin: number | null = null;
  for (const d of [run.kappa, run.shared, run.zones]) {
    for (const x of d.rhat) if (Number.isFinite(x) && (rhatMax === null || x > rhatMax)) rhatMax = x;
    for (const x of d.ess) if (Number.isFinite(x) && (essMin === null || x < essMin)) essMin = x;
  }
  return { rhatMax, essMin };
}
