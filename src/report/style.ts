import { Chalk, type ChalkInstance } from 'chalk';
import Table from 'cli-table3';

/** Colour only on a TTY and never with NO_COLOR (https://no-color.org). */
export function makeStyle(color: boolean): ChalkInstance {
  return new Chalk({ level: color ? 1 : 0 });
}

/** A cli-table3 table with its own colours off: we colour through chalk, so NO_COLOR is obeyed. */
export function makeTable(head: string[], style: ChalkInstance, colAligns?: ('left' | 'right')[]): Table.Table {
  return new Table({
    head: head.map((h) => style.bold(h)),
    style: { head: [], border: [], 'padding-left': 1, 'padding-right': 1 },
    // Compact: no rule between body rows, so a 10-state table still fits on a screen.
    chars: { mid: '', 'left-mid': '', 'mid-mid': '', 'right-mid': '' },
    ...(colAligns ? { colAligns } : {}),
  });
}

/** The last line of every forecast printout (DESIGN.md, "Cautions"). */
export const CAUTION =
  'Assumes the fitted transition probabilities hold in future and sites change independently; ' +
  'these numbers support, not replace, local expertise and continued monitoring.';

/** The same, for bands from the spatial block bootstrap: only blocks are taken as independent. */
export const BLOCK_CAUTION =
  'Assumes the fitted transition probabilities hold in future and blocks of sites (not single sites) change independently; ' +
  'these numbers support, not replace, local expertise and continued monitoring.';
