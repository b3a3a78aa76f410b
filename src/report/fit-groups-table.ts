import type { ChalkInstance } from 'chalk';
import type { TestReport } from '../diagnostics/assumption-tests.js';
import type { Fit } from '../fit/fit.js';
import { makeTable } from './style.js';

/** What `sere fit --by` prints: each group's fit and file, then whether the groups differ. */
export function fitGroupsTable(file: string, column: string, groups: readonly { group: string; fit: Fit; out: string }[],
  test: TestReport | null, style: ChalkInstance): string {
  const t = makeTable([column, 'sites', 'transitions', 'file'], style, ['left', 'right', 'right', 'left']);
  for (const g of groups) t.push([g.group, String(g.fit.sites.length), String(g.fit.transitions), g.out]);
  return `${style.bold(`Fits by ${column} of ${file}`)}\n${t.toString()}\n` + (test
    ? `Do the groups differ? G² ${test.g2.toFixed(2)}, df ${test.df}, p ${test.pG2.toFixed(3)}` +
      `${test.pBootstrap !== null ? ` (simulated p ${test.pBootstrap.toFixed(3)}, sparse table)` : ''} — ` +
      'a small p-value means separate fits are warranted; see sere check.\n'
    : '');
}
