/**
 * `npm run bench`: engine throughput and demo wall time. Speed is measured here, never in tests.
 *
 * 1. Engine: propagate 100,000 draws × 100 years × 10 states (random stochastic matrices), reported
 *    as draws·years·states² per second, best of 3 runs on one core.
 * 1b. Year-to-year variation (`npm run bench -- variation`): the same 100,000 × 100 × 10 run with a
 *    fresh year matrix per draw and year (row i ~ Dirichlet(50 · row i): 10⁹ gamma variates), beside
 *    the run without, best of 3 each, one core; and the demo forecast with variation estimated and
 *    with `--variation none` (wall, start-up included, best of 5).
 * 1c. The year kernel alone (`npm run bench -- kernel`, only when named; scripts/bench/year-kernel.ts):
 *    ns of CPU per gamma variate on a dense k = 10 matrix at κ = 50, a demo-like k = 5 matrix and
 *    small shapes (κ = 5, the boost).
 * 1d. One plot step (`npm run bench -- plot-kernel`, only when named; scripts/bench/plot-kernel.ts):
 *    5,000 plots in 6 states by multinomial.ts and by the WebAssembly kernel, µs of CPU.
 * 2. Bands: the three quantiles of 101 years × 10 states = 1,010 columns of 100,000 draws, by
 *    Hoare selection (the method before), by bucket counting in JavaScript (scripts/bands-reference.ts)
 *    and in the WebAssembly band kernel (now), alternating, best of 5 each; and the demo's 255
 *    columns of 4,000 draws in fresh processes (scripts/bench/bands-cold.ts), JavaScript against the
 *    kernel, CPU, best of 5 alternating.
 * 3. Posterior sampling: 100,000 draws of a 10-state matrix (1e6 Dirichlet rows), with the random
 *    stream before (MT19937 + stdlib's gamma) and now (xoshiro256** + Marsaglia–Tsang), alternating.
 * 4. Demo forecast: wall time of `sere forecast` on the demo scenario, start-up included (best of 5),
 *    without the sample cache and with a warm one (a temporary folder);
 *    `npm run bench -- zones`: the zoned demo (three zones, partial pooling, variation) likewise.
 * 5. Comparison: `sere compare` of 4 alternatives × 4,000 draws × 50 years × 6 states (treatments,
 *    a partial area and a landscape event), wall time with start-up (best of 5), cache off and warm.
 * 5b. Plots (`npm run bench -- plots`): a forecast of 5,000 sites as plots (`plots: latest`), 4,000
 *    draws × 30 years × 6 states with variation, wall with start-up (best of 5), cache off and warm.
 * 5c. Season (`npm run bench -- season`, only when named): `sere season` on a fresh demo workspace
 *    (`sere init W --zoned`), wall with start-up (best of 3), cache off and warm.
 * 6. Check: `sere check` on 10,000 sites × 10 surveys × 8 states with 1,000 posterior draws for
 *    the bands, wall time with start-up (best of 3).
 * 8. Fit: `sere fit` against scripts/bench/numpy-count.py on 10⁶ and 10⁷ rows (10⁵ and 10⁶ sites ×
 *    10 years × 8 states), alternating, best of 3, with CPU time and peak memory of each.
 * 9. Fit file: reading a fit of 10,000 sites × 10 states through the yaml library and with JSON.parse.
 * 10. Rasters (`npm run bench -- raster`, only when named): scripts/bench/raster.ts.
 * 11. Count (`npm run bench -- count`, only when named): `sere count` on 10⁷ CSV rows in-process and on
 *    DuckDB beside numpy-count.py, and on 10⁸ Parquet rows through DuckDB (scripts/bench/count-bench.ts).
 * 12. Gaps (scripts/bench/gaps.ts): 10,000 sites × 12 surveys × 8 states with 30% of visits missed —
 *    count, EM, the data-augmentation sampler (1,000 retained sweeps) and 1,000 matrix draws.
 * 13. Observer error (`npm run bench -- observer`, only when named; scripts/bench/observer.ts): the same size seen through an error matrix — fit,
 *    EM, the forward-filtering backward-sampling sampler, draws; draws/s and ESS/s.
 * 13b. Sampler threads (`npm run bench -- sampler-threads`, only when named; scripts/bench/sampler-threads.ts):
 *    the start-up cost of a sampler worker and the time per unit of sampler work, behind MIN_THREADED_SAMPLER_WORK.
 * 14. Recorded-scale scores (`npm run bench -- recorded-scores`, only when named; scripts/bench/recorded-scores.ts):
 *    2,000 sites × 12 surveys × 5 states × 1,000 draws scored through an error matrix and from the last record.
 * 15. Effort with an error table (`npm run bench -- effort-errors`, only when named; scripts/bench/effort-errors.ts):
 *    the observer-error sampler rerun per replicate and cell on the heath fixture, CPU seconds each.
 * 7. Against numpy (`npm run bench -- numpy`): the forecast job — posterior draws, the mix every
 *    year, bands every year, stationary mixes, first year at a target — at 100,000 draws × 100
 *    years × 10 states, as whole processes: `sere forecast --json` on a generated scenario (one
 *    thread, and the default) beside scripts/bench/numpy-forecast.py on the same counts,
 *    alternating, best of 3, with the ratio; then the peak RSS of both at 1,000,000 draws
 *    (/usr/bin/time); and the floor: a bare multiply-add loop doing the projection's arithmetic
 *    (x ← x·P, D × H × k² multiply-adds) with no summaries. Skipped, with a notice, without python3
 *    and numpy.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { propagate } from '../src/engine/propagate.js';
import { yearStreamKeys } from '../src/engine/year-matrix.js';
import { bandOf } from '../src/engine/quantiles.js';
import { quantilesBySelection } from './bench-old-quantiles.js';
import { bandOfReference } from './bands-reference.js';
import { randomStreams } from '../src/uncertainty/random.js';
import { existsSync } from 'node:fs';
import type { MatrixDraws } from '../src/uncertainty/draws.js';
import { benchFit, benchFitFile } from './bench/fit-vs-numpy.js';
import { benchRaster } from './bench/raster.js';
import { benchCountCsv, benchCountParquet } from './bench/count-bench.js';
import { benchGaps } from './bench/gaps.js';
import { benchObserver } from './bench/observer.js';
import { benchSamplerThreads } from './bench/sampler-threads.js';
import { benchRecordedScores } from './bench/recorded-scores.js';
import { benchYearKernel } from './bench/year-kernel.js';
import { benchPlotKernel } from './bench/plot-kernel.js';
import { benchEffortErrors } from './bench/effort-errors.js';

function randomDraws(count: number, k: number, seed: number): MatrixDraws {
  const random = randomStreams(seed);
  const data = new Float64Array(count * k * k);
  for (let r = 0; r < count * k; r++) {
    let total = 0;
    for (let j = 0; j < k; j++) { const w = random.uniform(); data[r * k + j] = w; total += w; }
    for (let j = 0; j < k; j++) data[r * k + j] /= total;
  }
  return { k, count, data, source: 'point', notes: [] };
}

function best<T>(runs: number, fn: () => T): number {
  let fastest = Infinity;
  for (let n = 0; n < runs; n++) {
    const t = performance.now();
    fn();
    fastest = Math.min(fastest, performance.now() - t);
  }
  return fastest;
}

/** `npm run bench -- bands` (or engine, sampling, demo, compare, check) runs one part only. */
const only = process.argv[2];
const want = (part: string): boolean => only === undefined || only === part;

const D = 100_000;
const H = 100;
const K = 10;
const engine = (label: string, record?: number[]): void => {
  const draws = randomDraws(D, K, 1);
  const start = new Float64Array(K).fill(1 / K);
  const work = D * H * K * K;
  const ms = best(3, () => propagate(draws, start, H, { target: { states: [0], bound: 'at-least', threshold: 0.5, staysMet: 1 }, record }));
  console.log(`engine, ${label}: ${D} draws × ${H} years × ${K} states: ${(ms / 1000).toFixed(2)} s, ` +
    `${(work / (ms / 1000) / 1e6).toFixed(0)} M draws·years·states²/s (target: under 5 s)`);
};
// Five reporting years, as a terminal table shows; then every year (808 MB of shares).
if (want('engine')) {
  engine('5 years kept', [0, 5, 10, 20, 50, 100]);
  engine('every year kept', undefined);
}

if (only === 'kernel') benchYearKernel();
if (only === 'plot-kernel') benchPlotKernel();

if (only === 'variation') {
  const draws = randomDraws(D, K, 1);
  const start = new Float64Array(K).fill(1 / K);
  const record = [0, 5, 10, 20, 50, 100];
  const variation = { concentration: new Float64Array(D * K).fill(50), keys: yearStreamKeys(randomStreams(2).stream('years'), D, H) };
  let without = Infinity;
  let withVariation = Infinity;
  for (let n = 0; n < 3; n++) {
    without = Math.min(without, best(1, () => propagate(draws, start, H, { record })));
    withVariation = Math.min(withVariation, best(1, () => propagate(draws, start, H, { record, variation })));
  }
  console.log(`engine, ${D} draws × ${H} years × ${K} states, one core: without variation ${(without / 1000).toFixed(2)} s, ` +
    `with a year matrix per draw and year ${(withVariation / 1000).toFixed(2)} s (${(withVariation / without).toFixed(2)}×; target: under 3×)`);
}

/**
 * Bands of 1,010 columns of D draws, as `bandsByStep` in engine/forecast.ts makes them: each column
 * copied into one scratch array, then summarised. 16 distinct columns (Beta(a, b) shares from
 * 0.5/60 to 30/40, skewed against 0 to bell-shaped) are cycled so the input stays in memory.
 */
function bandsBench(): void {
  const random = randomStreams(3).stream('bench-bands');
  const columns = Array.from({ length: 16 }, (_, c) => {
    const a = 0.5 + 2 * c;
    const b = 60 - 1.3 * c;
    return Float64Array.from({ length: D }, () => { const x = random.gamma(a); return x / (x + random.gamma(b)); });
  });
  const scratch = new Float64Array(D);
  // The probabilities as bandOf works them out at level 0.9: (1 − 0.9)/2 is 0.04999999999999999, not
  // 0.05, and at 0.05 the old way's low end differed in the last bit and the check below threw.
  const TAIL = (1 - 0.9) / 2;
  const oldWay = (): number => {
    let sink = 0;
    for (let c = 0; c < 1010; c++) {
      scratch.set(columns[c % 16]!);
      let sum = 0;
      for (let d = 0; d < D; d++) sum += scratch[d]!;
      const [low, median, high] = quantilesBySelection(scratch, [TAIL, 0.5, 1 - TAIL]) as [number, number, number];
      sink += low + median + high + sum / D;
    }
    return sink;
  };
  const jsWay = (): number => {
    let sink = 0;
    for (let c = 0; c < 1010; c++) {
      scratch.set(columns[c % 16]!);
      const band = bandOfReference(scratch, 0.9);
      sink += band.low + band.median + band.high + band.mean;
    }
    return sink;
  };
  const newWay = (): number => {
    let sink = 0;
    for (let c = 0; c < 1010; c++) {
      scratch.set(columns[c % 16]!);
      const band = bandOf(scratch, 0.9);
      sink += band.low + band.median + band.high + band.mean;
    }
    return sink;
  };
  if (oldWay() !== newWay() || jsWay() !== newWay()) throw new Error('bands: the methods disagree');
  let oldMs = Infinity;
  let jsMs = Infinity;
  let newMs = Infinity;
  for (let run = 0; run < 5; run++) {
    oldMs = Math.min(oldMs, best(1, oldWay));
    jsMs = Math.min(jsMs, best(1, jsWay));
    newMs = Math.min(newMs, best(1, newWay));
  }
  console.log(`bands: 101 years × 10 states of ${D} draws: Hoare selection ${(oldMs / 1000).toFixed(2)} s, ` +
    `bucket counting in JavaScript ${(jsMs / 1000).toFixed(2)} s, in the WebAssembly kernel ${(newMs / 1000).toFixed(2)} s (warm)`);
  // The demo's bands in fresh processes: the first use is what a forecast pays.
  const cold = (which: string): number => {
    const r = spawnSync(process.execPath, ['dist/scripts/bench/bands-cold.js', which], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(r.stderr);
    return Number(r.stdout);
  };
  let coldJs = Infinity;
  let coldWasm = Infinity;
  for (let run = 0; run < 5; run++) {
    coldJs = Math.min(coldJs, cold('js'));
    coldWasm = Math.min(coldWasm, cold('wasm'));
  }
  console.log(`bands of the demo (255 columns of 4000 draws) in a fresh process, CPU: JavaScript ${coldJs.toFixed(1)} ms, ` +
    `WebAssembly kernel ${coldWasm.toFixed(1)} ms (load ${loadavg()[0]!.toFixed(1)})`);
}
if (want('bands')) bandsBench();

if (want('sampling')) {
  // Before (MT19937 + stdlib's gamma, sere ≤ 0.4) and now, each in a process of its own
  // (scripts/bench-sampling.ts), alternating, best of 3 processes × 3 runs each.
  const timed = (which: string): number => {
    const r = spawnSync(process.execPath, ['dist/scripts/bench-sampling.js', which], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(r.stderr);
    return Number(r.stdout);
  };
  let oldMs = Infinity;
  let newMs = Infinity;
  for (let run = 0; run < 3; run++) {
    oldMs = Math.min(oldMs, timed('old'));
    newMs = Math.min(newMs, timed('new'));
  }
  console.log(`posterior sampling: ${D} draws of a ${K}-state matrix: MT19937 + stdlib gamma ${(oldMs / 1000).toFixed(2)} s, ` +
    `xoshiro256** + Marsaglia–Tsang ${(newMs / 1000).toFixed(2)} s (${(oldMs / newMs).toFixed(2)}× faster)`);
}

// Each demo run is timed without the sample cache and with a warm one (README, "The sample
// cache"): a folder of its own, warmed by one run first, so the user's cache is not touched.
const benchCache = mkdtempSync(join(tmpdir(), 'sere-bench-cache-'));
const runSere = (args: string[], cache: string): void => {
  const r = spawnSync(process.execPath, ['dist/cli/sere.mjs', ...args], { encoding: 'utf8', env: { ...process.env, SERE_CACHE: cache } });
  if (r.status !== 0) throw new Error(r.stderr);
};
const wall = (args: string[]): string => {
  const off = best(5, () => runSere(args, 'off'));
  runSere(args, benchCache);
  const warm = best(5, () => runSere(args, benchCache));
  return `${(off / 1000).toFixed(3)} s without the sample cache, ${(warm / 1000).toFixed(3)} s with it warm`;
};
if (want('demo')) {
  console.log(`demo forecast (scenarios/brenhollow/no-action.yaml, 4000 draws × 50 years, --variation none), wall incl. start-up: ${wall(['forecast', 'scenarios/brenhollow/no-action.yaml', '--variation', 'none'])} (target: under 0.3 s)`);
}
if (want('demo') || only === 'variation') {
  console.log(`demo forecast with year-to-year variation estimated (the default), wall incl. start-up: ${wall(['forecast', 'scenarios/brenhollow/no-action.yaml'])} (target: under 0.3 s)`);
}
if (want('demo') || only === 'zones') {
  // The zoned demo: three zones partially pooled, year-to-year variation, a zone-limited treatment (fitted from the survey table each run).
  console.log(`zoned demo forecast (scenarios/brenhollow/zoned.yaml: 3 zones, partial pooling, variation estimated, 4000 draws × 30 years), wall incl. start-up: ${wall(['forecast', 'scenarios/brenhollow/zoned.yaml'])} (target: under 1 s)`);
  console.log(`zoned demo forecast with --variation none, wall incl. start-up: ${wall(['forecast', 'scenarios/brenhollow/zoned.yaml', '--variation', 'none'])}`);
}

/**
 * A temp folder with surveys.csv: `sites` sites surveyed 2015–2024 in states s0 … s(k−1), each
 * year moved on by `next` (MT19937 from `seed`, so the table is the same every run).
 */
function surveyFolder(seed: number, sites: number, k: number, next: (state: number, random: ReturnType<typeof randomStreams>) => number): string {
  const dir = mkdtempSync(join(tmpdir(), 'sere-bench-'));
  const random = randomStreams(seed);
  const rows = ['site,time,state'];
  for (let site = 0; site < sites; site++) {
    let state = random.integer(k);
    for (let year = 2015; year <= 2024; year++) {
      rows.push(`p${site},${year},s${state}`);
      state = next(state, random);
    }
  }
  writeFileSync(join(dir, 'surveys.csv'), rows.join('\n') + '\n');
  return dir;
}

/** A 6-state survey table (300 sites × 10 years) and a 4-alternative scenario. */
function compareFixture(): string {
  const dir = surveyFolder(99, 300, 6, (state, random) => {
    const u = random.uniform();
    return u < 0.7 ? state : u < 0.9 ? Math.min(5, state + 1) : random.integer(6);
  });
  writeFileSync(join(dir, 'options.yaml'), [
    'data: surveys.csv',
    'uncertainty: { draws: 4000, seed: 5 }',
    'horizon: { years: 50 }',
    'target: { state: s5, share: 0.4 }',
    'events: [{ name: fire, every: 20, matrix: { s4: { s0: 0.5, s4: 0.5 }, s5: { s0: 0.5, s5: 0.5 } } }]',
    'alternatives:',
    '  - name: baseline',
    '  - name: boost',
    '    treatments: [{ name: boost, state: s3, multiply: { s4: 1.5 } }]',
    '  - name: partial',
    '    treatments: [{ name: partial, state: s1, set: { s2: 0.3 }, area: 0.4, years: [2026, 2035], ramp: 3 }]',
    '  - name: move',
    '    treatments: [{ name: move, state: s5, move: { from: s5, to: s4, share: 0.2 } }]',
    '',
  ].join('\n'));
  return join(dir, 'options.yaml');
}
if (want('compare')) {
  console.log(`compare: 4 alternatives × 4000 draws × 50 years × 6 states, wall incl. start-up: ${wall(['compare', compareFixture()])} (target: under 0.5 s)`);
}

/**
 * A 6-state survey table of 5,000 sites × 10 years and a forecast of every one of them as plots
 * (`plots: latest`): 4,000 draws × 30 years, variation estimated (the default for ten periods).
 */
function plotsFixture(): string {
  const dir = surveyFolder(12, 5000, 6, (state, random) => {
    const u = random.uniform();
    return u < 0.75 ? state : u < 0.92 ? Math.min(5, state + 1) : random.integer(6);
  });
  writeFileSync(join(dir, 'plots.yaml'), 'data: surveys.csv\nuncertainty: { draws: 4000, seed: 3 }\nhorizon: { years: 30 }\nplots: latest\n');
  return join(dir, 'plots.yaml');
}
if (want('plots')) {
  console.log(`forecast with plots on 5,000 sites (4000 draws × 30 years × 6 states, variation), wall incl. start-up: ${wall(['forecast', plotsFixture()])} (target: under 2 s)`);
}

// `sere season` on the demo workspace (`sere init W --zoned`, as `npm run demo` does): a fresh
// workspace per run, so every run does the same first-season work; only the season is timed.
if (only === 'season') {
  const seasonRun = (cache: string): number => {
    const w = join(mkdtempSync(join(tmpdir(), 'sere-bench-ws-')), 'w');
    const made = spawnSync(process.execPath, ['dist/cli/sere.mjs', 'init', w, '--zoned'], { encoding: 'utf8' });
    if (made.status !== 0) throw new Error(made.stderr);
    const t = performance.now();
    runSere(['season', w], cache);
    const ms = performance.now() - t;
    rmSync(w, { recursive: true, force: true });
    return ms;
  };
  let off = Infinity;
  for (let n = 0; n < 3; n++) off = Math.min(off, seasonRun('off'));
  seasonRun(benchCache);
  let warm = Infinity;
  for (let n = 0; n < 3; n++) warm = Math.min(warm, seasonRun(benchCache));
  console.log(`season on the demo workspace (sere init W --zoned; sere season W), wall incl. start-up, best of 3: ` +
    `${(off / 1000).toFixed(3)} s without the sample cache, ${(warm / 1000).toFixed(3)} s with it warm (target: under 5 s)`);
}
rmSync(benchCache, { recursive: true, force: true });

/** 10,000 sites × 10 annual surveys × 8 states from a first-order chain (MT19937, seed 8). */
function checkFixture(): string {
  const dir = surveyFolder(8, 10_000, 8, (state, random) => {
    const u = random.uniform();
    return u < 0.75 ? state : u < 0.9 ? (state + 1) % 8 : random.integer(8);
  });
  return join(dir, 'surveys.csv');
}
if (want('check')) {
  const checkFile = checkFixture();
  const checkMs = best(3, () => {
    const r = spawnSync(process.execPath, ['dist/cli/sere.mjs', 'check', checkFile, '--draws', '1000', '--seed', '1'], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(r.stderr);
  });
  console.log(`check: 10000 sites × 10 surveys × 8 states, 1000 posterior draws, wall incl. start-up: ${(checkMs / 1000).toFixed(3)} s (target: under 2 s)`);
}

// `sere fit` against a plain-numpy counting script on 10⁶ and 10⁷ rows, and loading a fit file of
// 10,000 sites (scripts/bench/fit-vs-numpy.ts).
if (want('fit')) {
  benchFit(100_000, 3);
  benchFit(1_000_000, 3);
  benchFitFile(5);
}

// `sere count` on 10⁷ CSV rows (in-process, DuckDB, numpy) and 10⁸ Parquet rows (DuckDB), once
// each: the big cases take minutes, so they run only when named (scripts/bench/count-bench.ts).
if (only === 'count') {
  benchCountCsv(1_000_000, 1);
  await benchCountParquet(10_000_000);
}

/**
 * A 10-state survey table (2,000 sites × 10 years, fixed seed), its counts for the numpy script,
 * and scenarios of `draws` draws × 100 years with a target, as files in a temp folder.
 */
function numpyFixture(): { dir: string; counts: string; scenario: (draws: number) => string } {
  const dir = surveyFolder(10, 2000, 10, (state, random) => {
    const u = random.uniform();
    return u < 0.7 ? state : u < 0.9 ? Math.min(9, state + 1) : random.integer(10);
  });
  const fit = spawnSync(process.execPath, ['dist/cli/sere.mjs', 'fit', join(dir, 'surveys.csv'), '--json'], { encoding: 'utf8', maxBuffer: 1 << 28 });
  if (fit.status !== 0) throw new Error(fit.stderr);
  const f = JSON.parse(fit.stdout) as { counts: number[][]; latest: { shares: number[] }; states: string[] };
  const counts = join(dir, 'counts.json');
  writeFileSync(counts, JSON.stringify({ counts: f.counts, start: f.latest.shares, target: [f.states.indexOf('s9'), 0.3] }));
  const scenario = (draws: number): string => {
    const file = join(dir, `job-${draws}.yaml`);
    // No year-to-year variation: the numpy script does not model it (a record of ten periods would
    // otherwise have it estimated by default), so both do the same job.
    writeFileSync(file, `data: surveys.csv\nuncertainty: { draws: ${draws}, seed: 7 }\nvariation: none\nhorizon: { years: 100 }\ntarget: { state: s9, share: 0.3 }\n`);
    return file;
  };
  return { dir, counts, scenario };
}

/** Wall seconds of a whole process, its output thrown away. */
function processSeconds(command: string, args: string[]): number {
  const t = performance.now();
  const r = spawnSync(command, args, { stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${command} ${args.join(' ')}: ${r.stderr}`);
  return (performance.now() - t) / 1000;
}

/** Peak resident memory of a whole process, in MB, from /usr/bin/time. */
function peakMb(command: string, args: string[]): number {
  const r = spawnSync('/usr/bin/time', ['-f', '%M', command, ...args], { stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${command} ${args.join(' ')}: ${r.stderr}`);
  const lines = r.stderr.trim().split('\n');
  return Number(lines[lines.length - 1]) / 1024;
}

/** The floor: x ← x·P for every draw and year, the projection's multiply-adds and nothing else. */
function multiplyAddFloor(): number {
  const draws = randomDraws(D, K, 2);
  const P = draws.data;
  const x = new Float64Array(K);
  const y = new Float64Array(K);
  let sink = 0;
  const ms = best(3, () => {
    for (let d = 0; d < D; d++) {
      x.fill(1 / K);
      const base = d * K * K;
      for (let t = 0; t < H; t++) {
        y.fill(0);
        for (let i = 0; i < K; i++) { const xi = x[i]!; for (let j = 0; j < K; j++) y[j] += xi * P[base + i * K + j]!; }
        x.set(y);
      }
      sink += x[0]!;
    }
  });
  if (!(sink > 0)) throw new Error('floor: nothing computed');
  return ms / 1000;
}

// Only when named (npm run bench -- raster): two 10⁸-pixel rasters in a temporary folder (scripts/bench/raster.ts).
if (only === 'raster') benchRaster();

// Only when named (npm run bench -- numpy): its 1,000,000-draw numpy case needs ~18 GB and minutes.
if (only === 'numpy') {
  const script = 'scripts/bench/numpy-forecast.py';
  const python = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' });
  if (python.status !== 0) {
    console.log('numpy: skipped (python3 with numpy is not available here)');
  } else {
    const fx = numpyFixture();
    const job = fx.scenario(D);
    const sere = (threads?: number): string[] => ['dist/cli/sere.mjs', 'forecast', job, '--json', ...(threads ? ['--threads', String(threads)] : [])];
    let one = Infinity; let all = Infinity; let numpy = Infinity;
    for (let run = 0; run < 3; run++) {
      one = Math.min(one, processSeconds(process.execPath, sere(1)));
      numpy = Math.min(numpy, processSeconds('python3', [script, fx.counts, String(D), String(H), '7']));
      all = Math.min(all, processSeconds(process.execPath, sere()));
    }
    console.log(`forecast job, ${D} draws × ${H} years × ${K} states, whole processes, best of 3 alternating: ` +
      `numpy ${numpy.toFixed(2)} s; sere 1 thread ${one.toFixed(2)} s (${(numpy / one).toFixed(2)}× numpy's speed), ` +
      `default threads ${all.toFixed(2)} s (${(numpy / all).toFixed(2)}×; ${(one / all).toFixed(2)}× one thread)`);
    const floor = multiplyAddFloor();
    console.log(`floor: bare multiply-add loop x ← x·P, ${D} × ${H} × ${K}² in one thread: ${floor.toFixed(2)} s`);
    if (existsSync('/usr/bin/time')) {
      const big = fx.scenario(1_000_000);
      const sereMb = peakMb(process.execPath, ['dist/cli/sere.mjs', 'forecast', big, '--json']);
      const numpyMb = peakMb('python3', [script, fx.counts, '1000000', String(H), '7']);
      console.log(`peak RSS at 1000000 draws × ${H} years × ${K} states: sere ${sereMb.toFixed(0)} MB, numpy ${numpyMb.toFixed(0)} MB`);
    } else {
      console.log('peak RSS: skipped (/usr/bin/time is not available here)');
    }
  }
}

if (want('gaps')) benchGaps();
if (only === 'observer') benchObserver();
// Only when named: sere effort with an error table, CPU per replicate and cell (scripts/bench/effort-errors.ts).
if (only === 'effort-errors') benchEffortErrors();
// Only when named: the sampler's worker start-up and time per unit of work (scripts/bench/sampler-threads.ts).
if (only === 'sampler-threads') benchSamplerThreads();
// Only when named: scoring sites on the recorded scale against scoring them from their last record (scripts/bench/recorded-scores.ts).
if (only === 'recorded-scores') benchRecordedScores();
