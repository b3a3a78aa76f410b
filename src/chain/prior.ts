import { SereError, quote } from '../errors.js';
import { settingName } from '../setting-name.js';

/** `jeffreys` = 0.5 per cell (Jeffreys 1946), `uniform` = 1 per cell, or any positive number. */
export type PriorSpec = 'jeffreys' | 'uniform' | number;

export function parsePrior(text: string, place: { path?: string; file?: string; line?: number; column?: number }): PriorSpec {
  if (text === 'jeffreys' || text === 'uniform') return text;
  const x = Number(text);
  if (text.trim() !== '' && x > 0 && Number.isFinite(x)) return x;
  throw new SereError('BAD_PRIOR', `prior ${quote(text)} is not jeffreys, uniform or a positive number`, place,
    `give ${settingName('--prior', 'fit.prior')} as jeffreys (0.5 per cell), uniform (1 per cell) or a positive pseudo-count such as 0.1`);
}

export function pseudoCount(prior: PriorSpec): number {
  if (prior === 'jeffreys') return 0.5;
  if (prior === 'uniform') return 1;
  return prior;
}

/**
 * Dirichlet prior parameters per cell: the pseudo-count where a transition can happen, and exactly
 * zero where the user declared it impossible (a structural zero). A structural zero therefore
 * gets no prior mass, stays zero in every draw, and differs from a transition merely never seen,
 * which keeps its pseudo-count.
 */
export function priorMatrix(k: number, prior: PriorSpec, impossible: Uint8Array): Float64Array {
  const a = pseudoCount(prior);
  const alpha = new Float64Array(k * k);
  for (let c = 0; c < k * k; c++) alpha[c] = impossible[c] ? 0 : a;
  return alpha;
}
