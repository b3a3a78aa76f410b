/**
 * `npm run bench -- recorded-scores` (only when named): the cost of scoring sites on the recorded
 * scale (evaluation/recorded-predictive.ts: each site's forward filter over its record, with every
 * draw's P and E) against the same sites scored from their last record alone
 * (evaluation/site-predictive.ts), as a season scores an earlier record: 2,000 sites × 12 yearly
 * surveys × 5 states, 1,000 draws, one target a year after the origin. CPU time of this process
 * (process.cpuUsage), best of 5, the two alternating, so that other jobs on a shared machine
 * stretch both alike. Then the same sites with one error matrix per observer (two observers, one
 * per survey at random, each draw carrying the pooled and both observers' matrices): the filter
 * reads each survey through its observer's matrix, so fewer sites share a record pattern.
 */
import { scoreSites } from '../../src/evaluation/site-scores.js';
import type { SurveyRecord } from '../../src/data/survey.js';
import type { MatrixDraws } from '../../src/uncertainty/draws.js';
import { randomStreams, type RandomStream } from '../../src/uncertainty/random.js';

const SITES = 2000;
const YEARS = 12;
const K = 5;
const D = 1000;
const ROUNDS = 5;

function pick(random: RandomStream, row: ArrayLike<number>, offset: number): number {
  let u = random.uniform();
  for (let j = 0; j < K - 1; j++) { if (u < row[offset + j]!) return j; u -= row[offset + j]!; }
  return K - 1;
}

/** A chain that mostly stays, and an observer who records 85% right, the rest to the neighbouring states. */
function matrices(): { p: Float64Array; e: Float64Array } {
  const p = new Float64Array(K * K);
  const e = new Float64Array(K * K);
  for (let i = 0; i < K; i++) {
    for (let j = 0; j < K; j++) p[i * K + j] = i === j ? 0.8 : 0.2 / (K - 1);
    e[i * K + i] = 0.85;
    e[i * K + ((i + 1) % K)] = 0.075;
    e[i * K + ((i + K - 1) % K)] = 0.075;
  }
  return { p, e };
}

export function benchRecordedScores(): void {
  const { p, e } = matrices();
  const random = randomStreams(20261202);
  const sim = random.stream('sites');
  const who = random.stream('observers'); // its own stream: the sites' records are as before
  const records: SurveyRecord[] = [];
  for (let s = 0; s < SITES; s++) {
    let x = pick(sim, new Float64Array(K).fill(1 / K), 0);
    for (let t = 0; t < YEARS; t++) {
      if (t > 0) x = pick(sim, p, x * K);
      records.push({ site: `s${s}`, time: 2000 + t, state: pick(sim, e, x * K), observer: who.uniform() < 0.5 ? 'A' : 'B', line: 2 + s * YEARS + t });
    }
  }
  const data = new Float64Array(D * K * K);
  const emissions = new Float64Array(D * K * K);
  for (let d = 0; d < D; d++) { data.set(p, d * K * K); emissions.set(e, d * K * K); }
  const withE: MatrixDraws = { k: K, count: D, data, emissions, source: 'point', notes: [] };
  const plain: MatrixDraws = { k: K, count: D, data, source: 'point', notes: [] };
  // Per observer: the pooled matrix and two observers' (the same E here: the cost, not the numbers, is measured).
  const observerEmissions = new Float64Array(D * 3 * K * K);
  for (let m = 0; m < D * 3; m++) observerEmissions.set(e, m * K * K);
  const perObserver: MatrixDraws = { ...withE, observerEmissions, observers: ['A', 'B'] };
  const origin = 2000 + YEARS - 2;
  const originCounts = new Array<number>(K).fill(0);
  for (const r of records) if (r.time === origin) originCounts[r.state]! += 1;
  const at = { origin, target: origin + 1, step: 1, originCounts, level: 0.9, initial: new Float64Array(K).fill(1 / K) };
  const cpu = (run: () => void): number => { const t0 = process.cpuUsage(); run(); const t = process.cpuUsage(t0); return (t.user + t.system) / 1e6; };
  const best = { recorded: Infinity, last: Infinity, observers: Infinity };
  for (let r = 0; r < ROUNDS; r++) {
    best.last = Math.min(best.last, cpu(() => scoreSites(plain, records, at, random.stream(`plain:${r}`))));
    best.recorded = Math.min(best.recorded, cpu(() => scoreSites(withE, records, at, random.stream(`recorded:${r}`))));
    best.observers = Math.min(best.observers, cpu(() => scoreSites(perObserver, records, at, random.stream(`observers:${r}`))));
  }
  console.log(`recorded-scale scores: ${SITES} sites × ${YEARS} surveys × ${K} states × ${D} draws — ` +
    `from the last record ${best.last.toFixed(3)} s CPU, on the recorded scale ${best.recorded.toFixed(3)} s CPU ` +
    `(${(best.recorded / best.last).toFixed(1)}×), one matrix per observer (2) ${best.observers.toFixed(3)} s CPU ` +
    `(${(best.observers / best.last).toFixed(1)}×; best of ${ROUNDS}, alternating)`);
}
