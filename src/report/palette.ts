/**
 * One colour per state, by its place in the fit's state order, so a state keeps its colour in
 * every chart of a run (fan chart, comparison grid, differences) and of a record. The colours are
 * the eight of Okabe & Ito (2008, "Color Universal Design"), chosen to stay distinct under the
 * common colour-vision deficiencies; the pale yellow comes last because thin lines of it vanish on
 * white. With more than eight states the colours repeat; every panel is also titled by its state.
 */
export const STATE_PALETTE = ['#0072B2', '#E69F00', '#009E73', '#D55E00', '#56B4E9', '#CC79A7', '#000000', '#F0E442'] as const;

export function stateColours(states: readonly string[]): string[] {
  return states.map((_, s) => STATE_PALETTE[s % STATE_PALETTE.length]!);
}

/** Lines that are not a state (the baseline for reference, zero, the target) use neutral greys. */
export const NEUTRAL = { reference: '#555555', rule: '#999999', target: '#222222' } as const;
