import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import type { Scenario } from '../../src/scenario/scenario.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { pickFrom } from '../error-helpers.js';

/** An invented three-state chain (bare, sward, scrub) and the records of its sites, every site surveyed every year. */
export const CHAIN = [[0.7, 0.25, 0.05], [0.1, 0.75, 0.15], [0.02, 0.08, 0.9]];
export const STATES = ['bare', 'sward', 'scrub'];

/** The true paths of `sites` sites over `years` years, seeded: what every error table of a comparison records. */
export function truePaths(seed: number, sites: number, years: number): number[][] {
  const random = randomStreams(seed).stream('paths');
  return Array.from({ length: sites }, () => {
    let state = pickFrom(random, [0.3, 0.4, 0.3]);
    return Array.from({ length: years }, (_, t) => (t === 0 ? state : (state = pickFrom(random, CHAIN[state]!))));
  });
}

/**
 * A scenario fitted to those paths as recorded through error matrix `e` (row = true), with an
 * accuracy assessment of `assessed` sites per true state drawn through the same `e` (or, with
 * `errors: false`, fitted to the records as they are). Files in a fresh temporary folder.
 */
export function errorScenario(paths: number[][], e: number[][] | undefined, options: { seed: number; assessed?: number; horizon?: number }): Scenario {
  const dir = mkdtempSync(join(tmpdir(), 'sere-error-effort-'));
  const random = randomStreams(options.seed).stream('records');
  const rows = ['site,time,state'];
  paths.forEach((path, s) => path.forEach((x, t) => rows.push(`p${String(s).padStart(3, '0')},${2001 + t},${STATES[e ? pickFrom(random, e[x]!) : x]}`)));
  writeFileSync(join(dir, 'surveys.csv'), rows.join('\n') + '\n');
  const lines = ['name: invented-heath', 'data: surveys.csv', `horizon: { years: ${options.horizon ?? 5} }`, 'variation: none',
    'uncertainty: { source: posterior, draws: 200, seed: 1 }'];
  if (e) {
    const assessment = ['recorded,verified,n'];
    const counts = STATES.map(() => STATES.map(() => 0));
    for (let x = 0; x < STATES.length; x++) for (let n = 0; n < (options.assessed ?? 100); n++) counts[x]![pickFrom(random, e[x]!)] += 1;
    counts.forEach((row, x) => row.forEach((n, r) => { if (n > 0) assessment.push(`${STATES[r]},${STATES[x]},${n}`); }));
    writeFileSync(join(dir, 'accuracy.csv'), assessment.join('\n') + '\n');
    lines.push('fit: { errors: accuracy.csv }');
  }
  writeFileSync(join(dir, 'scenario.yaml'), lines.join('\n') + '\n');
  return loadScenario(join(dir, 'scenario.yaml'));
}
