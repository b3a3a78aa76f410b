/**
 * `npm run bench -- effort-errors` (only when named): `sere effort` with an error table on the heath
 * fixture (test/fixtures/heath: 132 sites at the latest survey, 1,320 surveys, 5 states, one shared
 * error matrix, 5-year horizon), 500 draws per band, the effort sampler's defaults (EFFORT_SAMPLER:
 * 2 chains × 100 + 100). The fit's own sampler (DEFAULT_AUGMENT) runs first and is timed apart;
 * then "now" and a 2 × 2 grid (132 and 528 sites, 1 and 5 seasons) over 5 replicates, each a
 * rerun of the sampler on the extended records. Reports CPU seconds per replicate and cell (one
 * run; process CPU time, so it holds under load better than wall time).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { cpuUsage } from 'node:process';
import { loadScenario } from '../../src/scenario/load-scenario.js';
import { errorSurveyEffort, EFFORT_SAMPLER } from '../../src/evaluation/survey-effort-errors.js';
import { latentSampleOf } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';

const cpuSeconds = (since: NodeJS.CpuUsage): number => { const u = cpuUsage(since); return (u.user + u.system) / 1e6; };

export function benchEffortErrors(): void {
  const dir = mkdtempSync(join(tmpdir(), 'sere-bench-effort-'));
  try {
    writeFileSync(join(dir, 'surveys.csv'), readFileSync('test/fixtures/heath/surveys-observed.csv'));
    writeFileSync(join(dir, 'accuracy.csv'), readFileSync('test/fixtures/heath/accuracy.csv'));
    writeFileSync(join(dir, 'scenario.yaml'), ['name: heath', 'data: surveys.csv', 'fit: { errors: accuracy.csv }', 'horizon: { years: 5 }',
      'variation: none', 'uncertainty: { source: posterior, draws: 500, seed: 1 }'].join('\n') + '\n');
    const scenario = loadScenario(join(dir, 'scenario.yaml'));
    const random = randomStreams(20261203);
    let t = cpuUsage();
    latentSampleOf(scenario.fit, random);
    const fitSampler = cpuSeconds(t);
    const replicates = 5;
    const grid = { sites: [132, 528], seasons: [1, 5] };
    t = cpuUsage();
    errorSurveyEffort(scenario, grid, { replicates, draws: 500, random, sampler: EFFORT_SAMPLER });
    const effort = cpuSeconds(t);
    const runs = replicates * (1 + grid.sites.length * grid.seasons.length);
    const load = readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ');
    console.log(`effort with an error table (heath fixture, ${scenario.fit.errorModel!.records!.count} record patterns): fit sampler ${fitSampler.toFixed(2)} s CPU; ` +
      `now + 4 cells × ${replicates} replicates = ${runs} reruns in ${effort.toFixed(2)} s CPU, ${(effort / runs).toFixed(3)} s per replicate and cell (load ${load})`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
