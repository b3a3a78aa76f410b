/**
 * What every record pattern of one sweep of the observer-error sampler reads of (P, E), laid out
 * once per sweep instead of once per pattern and step (error-sampler.ts, one-path.ts):
 *   pT        P transposed, column b of P contiguous (pT[b·k + a] = P[a, b]): the forward filter's
 *             sum over a and the backward step's weights over a read one run of memory;
 *   pLast     the last positive entry of each row of P (the categorical draws' range);
 *   emit      one column per (error matrix, recorded state) — emit[(m·k + r)·k + x] = E_m[x, r] —
 *             the emission of every true state x at a survey recorded r through matrix m;
 *   emitSupport, emitCount  the x with emit ≠ 0 in each column, ascending: the forward filter skips
 *             E's structural zeros without looking at them.
 * Measured with the `observer` bench (DEVELOPERS.md, Benchmarks): the per-pattern strided reads of
 * P and E were most of the forward filter's time.
 */
export interface SweepTables {
  readonly k: number;
  /** P as drawn this sweep (row = from). */
  readonly p: Float64Array;
  readonly pT: Float64Array;
  readonly pLast: Int32Array;
  readonly emit: Float64Array;
  readonly emitSupport: Int32Array;
  readonly emitCount: Int32Array;
}

/** Tables for k states and m error matrices, filled by fillSweepTables each sweep. */
export function sweepTables(k: number, m: number): SweepTables {
  return {
    k, p: new Float64Array(k * k), pT: new Float64Array(k * k), pLast: new Int32Array(k),
    emit: new Float64Array(m * k * k), emitSupport: new Int32Array(m * k * k), emitCount: new Int32Array(m * k),
  };
}

/** Lay out P (k × k) and the error matrices E (m of k × k, row = true, column = recorded) for one sweep. */
export function fillSweepTables(tables: SweepTables, p: Float64Array, e: Float64Array): void {
  const { k, pT, pLast, emit, emitSupport, emitCount } = tables;
  const kk = k * k;
  tables.p.set(p);
  for (let a = 0; a < k; a++) {
    let last = 0;
    for (let b = 0; b < k; b++) {
      pT[b * k + a] = p[a * k + b]!;
      if (p[a * k + b]! > 0) last = b;
    }
    pLast[a] = last;
  }
  for (let column = 0; column < emitCount.length; column++) {
    const m = Math.floor(column / k);
    const r = column - m * k;
    let n = 0;
    for (let x = 0; x < k; x++) {
      const v = e[m * kk + x * k + r]!;
      emit[column * k + x] = v;
      if (v !== 0) emitSupport[column * k + n++] = x;
    }
    emitCount[column] = n;
  }
}
