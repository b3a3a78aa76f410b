import { closeSync, openSync, writeSync } from 'node:fs';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';

/** How a site moves on from one year to the next. */
export type Next = (state: number, random: RandomStream) => number;

/** The chain of the bench's larger tables: stay 75%, move up one 15%, anywhere 10% (8 states). */
export const benchChain = (k: number): Next => (state, random) => {
  const u = random.uniform();
  return u < 0.75 ? state : u < 0.9 ? (state + 1) % k : random.integer(k);
};

/**
 * Write `sites` sites × the years 2015–(2015 + years − 1) in states s0 … s(k−1) to `file`, as a
 * long table `site,time,state`, rows site by site (MT19937 from `seed`, so the table is the same
 * every run). Written in 1 MB blocks: 10⁷ rows must not be one string in memory.
 */
export function writeSurveyTable(file: string, seed: number, sites: number, years: number, k: number, next: Next): void {
  const random = randomStreams(seed);
  const fd = openSync(file, 'w');
  let block = 'site,time,state\n';
  for (let site = 0; site < sites; site++) {
    let state = random.integer(k);
    for (let year = 2015; year < 2015 + years; year++) {
      block += `p${site},${year},s${state}\n`;
      state = next(state, random);
    }
    if (block.length > 1 << 20) { writeSync(fd, block); block = ''; }
  }
  writeSync(fd, block);
  closeSync(fd);
}

// `node dist/scripts/bench/survey-table.js FILE SITES`: the bench's 8-state table, for profiling by hand.
if (process.argv[1]?.endsWith('survey-table.js') && process.argv.length === 4) {
  writeSurveyTable(process.argv[2]!, 8, Number(process.argv[3]), 10, 8, benchChain(8));
}
