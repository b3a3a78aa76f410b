/**
 * `npm run bench -- kernel` (only when named): the WebAssembly year kernel alone, in ns of user CPU (process.cpuUsage, less disturbed by other processes than wall time) per
 * gamma variate (one per non-zero cell of a varying row), best of 5 after a warm-up, on three kinds
 * of year matrix:
 * - "bench": k = 10, every row Dirichlet(50 · row), rows of uniform weights (as `bench -- variation`);
 *   shapes mostly 1 … 10.
 * - "demo-like": k = 5, a stay chance of 0.8–0.95, two or three small moves, one impossible cell,
 *   κ 60–120 and one row that does not vary (as the demo's fitted variation); shapes 0.5 … 110.
 * - "small shapes": k = 10, κ = 5 on the same rows as "bench": shapes mostly below 1 (the boost).
 * Beside each, when python3 with numpy is present: numpy's own `Generator.dirichlet` on the same rows,
 * vectorised over the years, in the same unit (scripts/bench/numpy-dirichlet.py) — the C
 * implementation of the same method, as the reference for what a gamma variate costs.
 */
import { spawnSync } from 'node:child_process';
import { loadavg } from 'node:os';
import { randomStreams, streamKey } from '../../src/uncertainty/random.js';
import { yearKernel } from '../../src/uncertainty/year-kernel.js';

interface Case { name: string; k: number; P: Float64Array; kappa: Float64Array }

function uniformRows(k: number, seed: number): Float64Array {
  const r = randomStreams(seed).stream('kernel-bench');
  const P = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    let total = 0;
    for (let j = 0; j < k; j++) { const w = r.uniform(); P[i * k + j] = w; total += w; }
    for (let j = 0; j < k; j++) P[i * k + j]! /= total;
  }
  return P;
}

function cases(): Case[] {
  const demo = Float64Array.of(
    0.85, 0.1, 0.04, 0, 0.01,
    0.05, 0.8, 0.12, 0.02, 0.01,
    0.01, 0.03, 0.9, 0.05, 0.01,
    0.005, 0, 0.02, 0.93, 0.045,
    0, 0, 0, 0.01, 0.99,
  );
  return [
    { name: 'bench (k 10, κ 50)', k: 10, P: uniformRows(10, 1), kappa: new Float64Array(10).fill(50) },
    { name: 'demo-like (k 5, κ 60–120)', k: 5, P: demo, kappa: Float64Array.of(81, 122, 67, 60, Infinity) },
    { name: 'small shapes (k 10, κ 5)', k: 10, P: uniformRows(10, 2), kappa: new Float64Array(10).fill(5) },
  ];
}

export function benchYearKernel(): void {
  const streams = 8;
  const keys = new Uint32Array(streams * 8);
  for (let n = 0; n < streams; n++) keys.set(streamKey(9, `kernel-bench:${n}`), n * 8);
  for (const c of cases()) {
    const { k, P, kappa } = c;
    let variates = 0;
    for (let i = 0; i < k; i++) if (kappa[i] !== Infinity) for (let j = 0; j < k; j++) if (P[i * k + j]! > 0) variates += 1;
    const years = Math.ceil(2e6 / variates);
    const kernel = yearKernel(k, streams, 1);
    for (let n = 0; n < streams; n++) kernel.startStream(n, keys, n * 8);
    kernel.setDraw(0, P, 0, kappa, 0);
    const run = (): number => {
      const t = process.cpuUsage();
      for (let y = 0; y < years; y++) kernel.sample(y % streams, 0);
      return process.cpuUsage(t).user / 1000;
    };
    run();
    let fastest = Infinity;
    for (let rep = 0; rep < 5; rep++) fastest = Math.min(fastest, run());
    console.log(`year kernel, ${c.name}: ${(fastest * 1e6 / (years * variates)).toFixed(1)} ns a variate ` +
      `(${years} year matrices, ${variates} variates each; load ${loadavg()[0]!.toFixed(1)})${numpyDirichlet(c, years)}`);
  }
}

/** numpy's Dirichlet rows on the same case, ns of user CPU a variate; '' without python3 and numpy. */
function numpyDirichlet(c: Case, years: number): string {
  const json = JSON.stringify({ k: c.k, P: Array.from(c.P), kappa: Array.from(c.kappa, (x) => (x === Infinity ? null : x)) });
  const run = spawnSync('python3', ['scripts/bench/numpy-dirichlet.py', json, String(years)], { encoding: 'utf8' });
  if (run.status !== 0) return '; numpy: not available here';
  return `; numpy's dirichlet on the same rows: ${Number(run.stdout.trim()).toFixed(1)} ns a variate`;
}
