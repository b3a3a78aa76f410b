/**
 * Which rows of the fitted matrix rest mostly on the prior rather than on the data.
 *
 * What a row contributes to the long-run mix and to distant horizons is chiefly how often sites
 * leave the state (its expected stay is 1 / (1 − pᵢᵢ)), so reliance is judged on the evidence about
 * leaving, not on the row total: a state seen 35 times staying and never leaving has plenty of data
 * on the row but none at all on leaving, and its rate of leaving is the prior's alone. A row rests
 * on the prior when the prior can move its rate of leaving:
 *
 * - it was never surveyed as a from-state (the whole row is the prior), or
 * - fewer than FEW_LEAVING transitions out of it to another state were seen (never or rarely seen
 *   to leave), or
 * - the prior's pseudo-counts on the possible transitions to other states are at least
 *   PRIOR_SHARE_OF_LEAVING of the posterior's leaving total (pseudo-counts + observed leavings) —
 *   the posterior mean rate of leaving is then at least that far from the data's.
 *
 * A row whose every transition to another state is declared impossible stays put by declaration,
 * not by the prior, and is never flagged. The thresholds are conventions, stated so that a reader
 * can apply them by hand; they are not tests.
 */
export const FEW_LEAVING = 10;
export const PRIOR_SHARE_OF_LEAVING = 0.1;

export type RelianceReason = 'never-from' | 'rarely-left' | 'prior-share';

export interface PriorReliance {
  readonly state: number;
  readonly reason: RelianceReason;
  /** Transitions observed out of the state (staying included). */
  readonly observed: number;
  /** Of those, transitions to another state. */
  readonly leaving: number;
  /** Prior pseudo-counts on the possible transitions to other states. */
  readonly priorLeaving: number;
}

export function rowsRestingOnPrior(counts: ArrayLike<number>, alpha: ArrayLike<number>, k: number): PriorReliance[] {
  const out: PriorReliance[] = [];
  for (let i = 0; i < k; i++) {
    let observed = 0; let leaving = 0; let priorLeaving = 0;
    for (let j = 0; j < k; j++) {
      const n = counts[i * k + j]!;
      observed += n;
      if (j === i) continue;
      leaving += n;
      priorLeaving += alpha[i * k + j]!;
    }
    if (priorLeaving === 0) continue;
    const reason: RelianceReason | null = observed === 0 ? 'never-from'
      : leaving < FEW_LEAVING ? 'rarely-left'
        : priorLeaving / (priorLeaving + leaving) >= PRIOR_SHARE_OF_LEAVING ? 'prior-share'
          : null;
    if (reason) out.push({ state: i, reason, observed, leaving, priorLeaving });
  }
  return out;
}
