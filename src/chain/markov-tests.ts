import type { Table } from './contingency.js';

type Sparse3 = readonly (readonly [number, number, number])[];
type Sparse4 = readonly (readonly [number, number, number, number])[];

/**
 * Order 0 against order 1 (Anderson & Goodman 1957, §3.4): is the next state independent of the
 * current one? One table, rows = from state, columns = to state.
 */
export function orderZeroVsOne(counts: Float64Array, k: number): Table[] {
  return [{ rows: k, cols: k, counts: Float64Array.from(counts) }];
}

/**
 * Order 1 against order 2 (Anderson & Goodman 1957, §3.3): given the current state j, is the next
 * state independent of the previous one? One table per j from runs of three surveys: rows = the
 * state before j, columns = the state after.
 */
export function orderOneVsTwo(triples: Sparse4, k: number): Table[] {
  const tables = Array.from({ length: k }, () => ({ rows: k, cols: k, counts: new Float64Array(k * k) }));
  for (const [i, j, l, n] of triples) tables[j]!.counts[i * k + l] += n;
  return tables;
}

/**
 * Homogeneity across strata — survey periods or groups of sites (Anderson & Goodman 1957, §3.2):
 * are the transition probabilities out of each state the same in every stratum? One table per
 * from state: rows = strata, columns = to state.
 */
export function homogeneity(strata: readonly Sparse3[], k: number): Table[] {
  const S = strata.length;
  const tables = Array.from({ length: k }, () => ({ rows: S, cols: k, counts: new Float64Array(S * k) }));
  strata.forEach((cells, s) => { for (const [i, j, n] of cells) tables[i]!.counts[s * k + j] += n; });
  return tables;
}

export interface OrderFit {
  readonly order: 0 | 1 | 2;
  readonly logLikelihood: number;
  /** Free parameters: for each history with data, the possible next states less one. */
  readonly parameters: number;
  readonly aic: number;
  readonly bic: number;
}

/**
 * AIC (Akaike 1974; for Markov chain order, Tong 1975) and BIC (Schwarz 1978; Katz 1981) of
 * chains of order 0, 1 and 2, all fitted to the same runs of three surveys so that they see the
 * same data. Structural zeros and histories never seen carry no parameters.
 */
export function orderSelection(triples: Sparse4, k: number, impossible: Uint8Array): OrderFit[] {
  const n3 = new Map<number, number>();
  const n2 = new Float64Array(k * k);
  const n1 = new Float64Array(k);
  let total = 0;
  for (const [i, j, l, n] of triples) {
    n3.set((i * k + j) * k + l, n);
    n2[j * k + l] += n;
    n1[l] += n;
    total += n;
  }
  const possibleFrom = (j: number): number => { let c = 0; for (let l = 0; l < k; l++) if (!impossible[j * k + l]) c += 1; return c; };
  const fits: { order: 0 | 1 | 2; logLikelihood: number; parameters: number }[] = [];

  let l0 = 0;
  for (let l = 0; l < k; l++) if (n1[l]! > 0) l0 += n1[l]! * Math.log(n1[l]! / total);
  fits.push({ order: 0, logLikelihood: l0, parameters: n1.filter((x) => x > 0).length - 1 });

  let l1 = 0; let p1 = 0;
  for (let j = 0; j < k; j++) {
    let row = 0;
    for (let l = 0; l < k; l++) row += n2[j * k + l]!;
    if (row === 0) continue;
    p1 += possibleFrom(j) - 1;
    for (let l = 0; l < k; l++) { const v = n2[j * k + l]!; if (v > 0) l1 += v * Math.log(v / row); }
  }
  fits.push({ order: 1, logLikelihood: l1, parameters: p1 });

  let l2 = 0; let p2 = 0;
  for (let h = 0; h < k * k; h++) {
    let row = 0;
    for (let l = 0; l < k; l++) row += n3.get(h * k + l) ?? 0;
    if (row === 0) continue;
    p2 += possibleFrom(h % k) - 1;
    for (let l = 0; l < k; l++) { const v = n3.get(h * k + l) ?? 0; if (v > 0) l2 += v * Math.log(v / row); }
  }
  fits.push({ order: 2, logLikelihood: l2, parameters: p2 });

  return fits.map((f) => ({ ...f, aic: -2 * f.logLikelihood + 2 * f.parameters, bic: -2 * f.logLikelihood + f.parameters * Math.log(total) }));
}
