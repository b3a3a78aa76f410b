/**
 * `sere fit` against a plain-numpy counting script (numpy-count.py) on the bench's long tables,
 * and the loading of a fit file with 10,000 sites. Part of `npm run bench`; run alone with
 * `node dist/scripts/bench/fit-vs-numpy.js [ROWS…]`.
 *
 * Whole processes, start-up included, alternating sere and numpy so that both see the same load,
 * best of N; peak resident memory from `/usr/bin/time -v`.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { readJsonStructured } from '../../src/data/read-json.js';
import { readStructured } from '../../src/data/read-structured.js';
import { fitFileSchema } from '../../src/fit/fit-file-schema.js';
import { loadFit } from '../../src/fit/load-fit.js';
import { benchChain, writeSurveyTable } from './survey-table.js';
import { measure, numpyAvailable, type Run } from './measure-process.js';


/** sere fit and numpy-count.py on `sites` × 10 years × 8 states, alternating, best of `runs`. */
export function benchFit(sites: number, runs: number): void {
  const dir = mkdtempSync(join(tmpdir(), 'sere-bench-fit-'));
  try {
    const table = join(dir, 'surveys.csv');
    writeSurveyTable(table, 8, sites, 10, 8, benchChain(8));
    const rows = sites * 10;
    const mb = statSync(table).size / 1e6;
    const sere: Run[] = [];
    const numpy: Run[] = [];
    const hasNumpy = numpyAvailable();
    for (let n = 0; n < runs; n++) {
      sere.push(measure(process.execPath, ['dist/cli/sere.mjs', 'fit', table]));
      if (hasNumpy) numpy.push(measure('python3', ['scripts/bench/numpy-count.py', table]));
    }
    const best = (list: Run[]): Run => list.reduce((a, b) => (b.seconds < a.seconds ? b : a));
    const s = best(sere);
    const rate = (r: Run): string => `${(rows / r.seconds / 1e6).toFixed(2)} M rows/s`;
    const line = (who: string, r: Run, all: Run[]): string => `${who} ${r.seconds.toFixed(2)} s (${rate(r)}; CPU ${r.cpu.toFixed(2)} s; ` +
      `peak ${Math.max(...all.map((x) => x.peakMb)).toFixed(0)} MB)`;
    const label = `fit: ${rows.toLocaleString('en')} rows (${sites.toLocaleString('en')} sites × 10 years × 8 states, ${mb.toFixed(0)} MB), wall incl. start-up, best of ${runs} alternating`;
    if (!hasNumpy) {
      console.log(`${label}: ${line('sere', s, sere)}; numpy not available`);
      return;
    }
    const p = best(numpy);
    // The same counts, or the comparison means nothing: numpy prints its first row of counts.
    const firstRow = /first row \[([\d, ]+)\]/.exec(p.stdout)?.[1]!.split(', ').map(Number) ?? [];
    if (!firstRow.every((c) => s.stdout.includes(String(c)))) throw new Error('sere and numpy counted differently');
    console.log(`${label}: ${line('sere', s, sere)} · ${line('numpy', p, numpy)} · numpy/sere ${(p.seconds / s.seconds).toFixed(2)}× (target: at least 1×)`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Loading a fit file of 10,000 sites × 10 states: the yaml library's path (before) and JSON.parse (after). */
export function benchFitFile(runs: number): void {
  const dir = mkdtempSync(join(tmpdir(), 'sere-bench-fitfile-'));
  try {
    const table = join(dir, 'surveys.csv');
    const file = join(dir, 'fit.json');
    writeSurveyTable(table, 10, 10_000, 10, 10, benchChain(10));
    const r = spawnSync(process.execPath, ['dist/cli/sere.mjs', 'fit', table, '--out', file], { encoding: 'utf8' });
    if (r.status !== 0 || !existsSync(file)) throw new Error(r.stderr);
    const best = (fn: () => unknown): number => {
      let fastest = Infinity;
      for (let n = 0; n < runs; n++) {
        const t = performance.now();
        fn();
        fastest = Math.min(fastest, performance.now() - t);
      }
      return fastest / 1000;
    };
    const yaml = best(() => readStructured(file, fitFileSchema, 'fit file', 'BAD_FIT_FILE'));
    const json = best(() => readJsonStructured(file, fitFileSchema, 'fit file', 'BAD_FIT_FILE'));
    const whole = best(() => loadFit(file));
    console.log(`fit file: 10,000 sites × 10 states (${(statSync(file).size / 1e6).toFixed(1)} MB), best of ${runs}: ` +
      `read and validated through the yaml library (before) ${yaml.toFixed(3)} s, with JSON.parse (after) ${json.toFixed(3)} s ` +
      `(${(yaml / json).toFixed(0)}× faster); loadFit with every invariant ${whole.toFixed(3)} s`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1]?.endsWith('fit-vs-numpy.js')) {
  const sizes = process.argv.slice(2).map(Number);
  for (const sites of sizes.length ? sizes : [100_000, 1_000_000]) benchFit(sites, 3);
  benchFitFile(5);
}
