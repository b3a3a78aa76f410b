import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sereInProcess } from './in-process.js';
import { tempFiles } from '../helpers.js';

const SURVEYS = 'test/fixtures/heath/surveys-observed.csv';
const ACCURACY = 'test/fixtures/heath/accuracy.csv';
const { dir, write } = tempFiles('sere-cli-errors-');
const SAMPLER = ['--seed', '4', '--chains', '2', '--warm-up', '40', '--retained', '60', '--thin', '1'];

describe('--errors on sere fit and sere check, fit.errors in a scenario', () => {
  it('sere fit --errors --json writes the error model and the sampler\'s error sweeps', async () => {
    const r = await sereInProcess(['fit', SURVEYS, '--errors', ACCURACY, '--json', ...SAMPLER]);
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.estimation.method).toBe('em-observer-error');
    expect(json.error_model.orientation).toBe('rows are true (verified) states, columns are recorded states');
    expect(json.error_model.assessment.flat().reduce((a: number, b: number) => a + b, 0)).toBe(300);
    expect(json.posterior_sampler.error_matrices).toHaveLength(60);
    expect(json.posterior_sampler.latest_true_counts[0].reduce((a: number, b: number) => a + b, 0)).toBe(150);
  });

  it('a missing error matrix: one line naming the file and the flag, exit 1, nothing written', async () => {
    const out = join(dir, 'never.json');
    const r = await sereInProcess(['fit', SURVEYS, '--errors', 'no-such.csv', '--out', out, ...SAMPLER]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('no-such.csv');
    expect(r.stderr).toContain('--errors');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(existsSync(out)).toBe(false);
  });

  it('a bad error matrix: its code, file and line (--debug shows the code)', async () => {
    const bad = write('bad.csv', 'recorded,verified,n\nyoung-heath,young-heath,-2\n');
    const r = await sereInProcess(['fit', SURVEYS, '--errors', bad, '--debug', ...SAMPLER]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_ERROR_MATRIX]');
    expect(r.stderr).toContain(`${bad}:2:3`);
  });

  it('sere check on a fit file refuses --errors like the other fit flags', async () => {
    const fit = join(dir, 'fit.json');
    expect((await sereInProcess(['fit', SURVEYS, '--errors', ACCURACY, '--out', fit, ...SAMPLER])).code).toBe(0);
    const r = await sereInProcess(['check', fit, '--errors', ACCURACY, '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_OPTION]');
  });

  it('a scenario names the error matrix relative to itself, and the forecast starts from the true mix', async () => {
    write('accuracy.csv', readFileSync(ACCURACY, 'utf8'));
    const scenario = write('s.yaml', [
      'name: observed heath',
      `data: ${join(process.cwd(), SURVEYS)}`,
      'fit: { errors: accuracy.csv, impossible: [mature-heath>bare-peat] }',
      'horizon: { years: 5 }',
      'variation: none',
      'uncertainty: { source: posterior, draws: 200, seed: 3 }',
    ].join('\n') + '\n');
    const r = await sereInProcess(['forecast', scenario, '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    // The start is each draw's true mix: the 2024 band has width, which the recorded mix alone would not give.
    const json = JSON.parse(r.stdout);
    expect(JSON.stringify(json)).toContain('young-heath');
    // start.shares is the true start the draws used: their mean, which is also the mean share in the start year.
    const sc = json.scenarios[0];
    for (const state of json.scenarios[0].states ?? Object.keys(sc.start.shares)) {
      expect(sc.start.shares[state]).toBeCloseTo(sc.shares[state].mean[0], 12);
    }
    // …and the recorded mix beside it: the 132 sites surveyed in 2024 (scripts/heath-fixture.ts), as sere fit reports it.
    const fitted = JSON.parse((await sereInProcess(['fit', SURVEYS, '--json'])).stdout);
    expect(sc.start.recorded_shares).toEqual(Object.fromEntries(fitted.states.map((s: string, i: number) => [s, fitted.latest.shares[i]])));
    expect(sc.start.shares['young-heath']).not.toBeCloseTo(sc.start.recorded_shares['young-heath'], 3);
    // "Already met" is judged on the same true start: a young-heath threshold between the recorded
    // share and the true one (observers record young heath as grassland, so the record is lower).
    const [recorded, truth] = [sc.start.recorded_shares['young-heath'], sc.start.shares['young-heath']];
    expect(recorded).toBeLessThan(truth);
    const threshold = (recorded + truth) / 2;
    const targeted = write('t.yaml', readFileSync(scenario, 'utf8') + `target: { state: young-heath, at_least: ${threshold} }\n`);
    const t = JSON.parse((await sereInProcess(['forecast', targeted, '--json'])).stdout);
    expect(t.scenarios[0].dominance.already_met).toBe(true);
    const missing = write('m.yaml', 'name: m\ndata: ' + join(process.cwd(), SURVEYS) + '\nfit: { errors: nowhere.csv }\nhorizon: { years: 5 }\n');
    const m = await sereInProcess(['forecast', missing, '--debug']);
    expect(m.code).toBe(1);
    expect(m.stderr).toContain('[FILE_NOT_FOUND]');
    expect(m.stderr).toContain('fit.errors');
  });
});

describe('plot counts with observer error', () => {
  const { dir: plotsDir, write: put } = tempFiles('sere-cli-errors-plots-');
  put('accuracy.csv', readFileSync(ACCURACY, 'utf8'));
  const scenarioWith = (name: string, plots: string, errors = true) => put(name, [
    `name: ${name}`, `data: ${join(process.cwd(), SURVEYS)}`, ...(errors ? ['fit: { errors: accuracy.csv }'] : []),
    'horizon: { years: 5 }', 'variation: none', 'uncertainty: { source: posterior, draws: 200, seed: 3 }', `plots: ${plots}`,
  ].join('\n') + '\n');
  type PlotsJson = { total: number; scale: string; [state: string]: unknown };
  const plotsOf = (stdout: string): PlotsJson => JSON.parse(stdout).scenarios[0].plots;
  /** The forecast without the scenario file's own hash (the files differ in their plots line). */
  const unhashed = (stdout: string): string => JSON.stringify({ ...JSON.parse(stdout).scenarios[0], sha256: '' });

  it('are forecast as recorded or as true, the JSON and CSV saying which, the same seed giving the same bytes', async () => {
    const recorded = scenarioWith('rec.yaml', '{ count: latest, as: recorded }');
    const a = await sereInProcess(['forecast', recorded, '--json']);
    expect(a.stderr).toBe('');
    expect(a.code).toBe(0);
    const b = await sereInProcess(['forecast', recorded, '--json']);
    expect(b.stdout).toBe(a.stdout);
    const rec = plotsOf(a.stdout);
    expect(rec.scale).toBe('recorded');
    // plots: latest with observer error: the latest survey's 132 sites (scripts/heath-fixture.ts), split by the true mix.
    expect(rec.total).toBe(132);
    const truth = plotsOf((await sereInProcess(['forecast', scenarioWith('true.yaml', '{ count: latest, as: true }'), '--json'])).stdout);
    expect(truth.scale).toBe('true');
    // The fixture's observer records some young heath as grassland: recorded young heath sits below the true count.
    const mean = (p: PlotsJson, state: string) => (p[state] as { mean: number[] }).mean;
    expect(mean(rec, 'young-heath')[0]!).toBeLessThan(mean(truth, 'young-heath')[0]!);
    const csvFile = join(plotsDir, 'rec.csv');
    expect((await sereInProcess(['forecast', recorded, '--csv', csvFile])).code).toBe(0);
    const csv = readFileSync(csvFile, 'utf8');
    expect(csv).toContain(',plots_recorded,');
    expect(csv).not.toContain(',plots,');
  });

  it('without an error model, as: recorded changes no number (the records are the truth), and plots: 40 and { count: 40 } give the same forecast byte for byte', async () => {
    const plain = await sereInProcess(['forecast', scenarioWith('plain.yaml', '40', false), '--json']);
    expect(plain.code).toBe(0);
    const object = await sereInProcess(['forecast', scenarioWith('plain.yaml', '{ count: 40 }', false), '--json']);
    expect(unhashed(object.stdout)).toBe(unhashed(plain.stdout));
    const rec = await sereInProcess(['forecast', scenarioWith('plain.yaml', '{ count: 40, as: recorded }', false), '--json']);
    const { scale: s1, ...p1 } = plotsOf(rec.stdout);
    const { scale: s2, ...p2 } = plotsOf(plain.stdout);
    expect([s1, s2]).toEqual(['recorded', 'true']);
    expect(JSON.stringify(p1)).toBe(JSON.stringify(p2));
    // Said, so it is not read as a recorded-scale prediction through an error matrix.
    expect(JSON.parse(rec.stdout).scenarios[0].notes.some((n: string) => n.startsWith('plots as recorded: no error table'))).toBe(true);
    expect(JSON.parse(plain.stdout).scenarios[0].notes.some((n: string) => n.startsWith('plots as recorded'))).toBe(false);
  });

  it('a scale other than true or recorded: one line naming plots.as', async () => {
    const r = await sereInProcess(['forecast', scenarioWith('bad.yaml', '{ count: 40, as: observed }'), '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_SCENARIO]');
    expect(r.stderr).toContain('plots');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });
});

describe('the site bootstrap with observer error', () => {
  it('is refused in one line naming the scenario key', async () => {
    const { write: put } = tempFiles('sere-cli-errors-bootstrap-');
    put('accuracy.csv', readFileSync(ACCURACY, 'utf8'));
    const scenario = put('b.yaml', [
      'name: boot', `data: ${join(process.cwd(), SURVEYS)}`, 'fit: { errors: accuracy.csv }', 'horizon: { years: 5 }',
      'uncertainty: { source: bootstrap, draws: 50 }',
    ].join('\n') + '\n');
    const r = await sereInProcess(['forecast', scenario, '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_SCENARIO]');
    expect(r.stderr).toContain('b.yaml:5');
    expect(r.stderr).toContain('(uncertainty.source)');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });
});

describe('sere hindcast with --errors', () => {
  it('fits each origin with the same error table and scores on the recorded scale, saying so in the JSON and the table', async () => {
    // The heath surveys from 2020 on: three origins with transitions, each one sampler run.
    const lines = readFileSync(SURVEYS, 'utf8').trim().split('\n');
    const recent = write('recent.csv', [lines[0], ...lines.slice(1).filter((l) => Number(l.split(',')[1]) >= 2020)].join('\n') + '\n');
    const r = await sereInProcess(['hindcast', recent, '--errors', ACCURACY, '--years', '1', '--draws', '200', '--seed', '9', '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.scale).toBe('recorded');
    expect(json.errors).toBe(ACCURACY);
    // Origins 2021, 2022 and 2023 (2020 alone has no transition), each scored a year later.
    expect(json.cases.map((c: { origin: number }) => c.origin)).toEqual([2021, 2022, 2023]);
    for (const c of json.cases) {
      expect(c.scale).toBe('recorded');
      expect(c.observed.reduce((a: number, b: number) => a + b, 0)).toBe(c.sites);
      expect(c.chain.log).toBeGreaterThan(0);
    }
    expect(json.summary[0].scale).toBe('recorded');
    expect(json.summary[0].coverage.bands).toBe(3 * 5);
    const table = await sereInProcess(['hindcast', recent, '--errors', ACCURACY, '--years', '1', '--draws', '200', '--seed', '9']);
    expect(table.stdout).toContain('scored on the recorded scale');
    // Without the error table: no scale key (the records are the truth), and other numbers.
    const plain = JSON.parse((await sereInProcess(['hindcast', recent, '--years', '1', '--draws', '200', '--seed', '9', '--json'])).stdout);
    expect(plain.scale).toBeUndefined();
    expect(plain.cases[0].scale).toBeUndefined();
    expect(plain.cases[0].chain.log).not.toBe(json.cases[0].chain.log);
  }, 180_000);
});

describe('sere hindcast with an error table it cannot read', () => {
  it('says so in one line, instead of leaving every origin out (a trial found 0 forecasts and exit 0)', async () => {
    const r = await sereInProcess(['hindcast', SURVEYS, '--errors', join(dir, 'no-such-table.csv'), '--years', '1', '--draws', '50', '--seed', '9', '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[FILE_NOT_FOUND]');
    expect(r.stdout).toBe('');
  });
});

describe('sere effort and sere check with an error table', () => {
  const effortScenario = (name: string, extra: string[] = []): string => {
    write('accuracy.csv', readFileSync(ACCURACY, 'utf8'));
    return write(name, ['name: effort', `data: ${join(process.cwd(), SURVEYS)}`, 'fit: { errors: accuracy.csv }',
      'horizon: { years: 5 }', 'variation: none', 'uncertainty: { source: posterior, draws: 100, seed: 3 }', ...extra].join('\n') + '\n');
  };

  it('effort reruns the error-model sampler per cell and replicate, with its own settings, reported', async () => {
    const args = ['effort', effortScenario('effort.yaml'), '--sites', '30,120', '--seasons', '2', '--replicates', '2', '--draws', '100', '--seed', '5'];
    const r = await sereInProcess([...args, '--chains', '2', '--warm-up', '30', '--retained', '40', '--thin', '1', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.sampler).toEqual({ chains: 2, warm_up: 30, retained: 40, thin: 1 });
    expect(json.cells.map((c: { sites: number; seasons: number }) => [c.sites, c.seasons])).toEqual([[30, 2], [120, 2]]);
    for (const w of [json.current, ...json.cells.map((c: { widths: unknown }) => c.widths)]) {
      for (const x of Object.values(w as Record<string, number>)) expect(x > 0 && x < 1).toBe(true);
    }
    // The same seed and settings give the same bytes.
    expect((await sereInProcess([...args, '--chains', '2', '--warm-up', '30', '--retained', '40', '--thin', '1', '--json'])).stdout).toBe(r.stdout);
    const table = await sereInProcess([...args, '--chains', '2', '--warm-up', '30', '--retained', '40', '--thin', '1']);
    expect(table.stdout).toContain('2 chains, 30 sweeps dropped, 40 kept, thin 1');
  }, 120_000);

  it('effort on a fit file with an error table is refused in one line naming data (the file keeps no site records)', async () => {
    const fitFile = join(dir, 'heath-fit.json');
    expect((await sereInProcess(['fit', SURVEYS, '--errors', ACCURACY, '--out', fitFile, ...SAMPLER])).code).toBe(0);
    const scenario = write('from-fit.yaml', ['name: from-fit', `data: ${fitFile}`, 'horizon: { years: 5 }', 'variation: none'].join('\n') + '\n');
    const r = await sereInProcess(['effort', scenario, '--replicates', '2', '--draws', '50', '--seed', '1', '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_OPTION]');
    expect(r.stderr).toContain(`${scenario} (data)`);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stdout).toBe('');
  }, 120_000);

  it('effort with zones pooled partially and an error table stays refused where the fit is made (BAD_ZONES at fit.pooling)', async () => {
    write('grouped-accuracy.csv', 'recorded,verified,n\na,a,20\nb,b,20\n');
    const scenario = write('zoned.yaml', ['name: zoned', `data: ${join(process.cwd(), 'test/fixtures/grouped.csv')}`,
      'fit: { columns: { group: soil }, pooling: partial, errors: grouped-accuracy.csv }', 'horizon: { steps: 2 }'].join('\n') + '\n');
    const r = await sereInProcess(['effort', scenario, '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[BAD_ZONES]');
    expect(r.stderr).toContain('fit.pooling');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });

  it('effort\'s sampler flags take whole numbers (a usage error, exit 2)', async () => {
    for (const flag of ['--chains', '--warm-up', '--retained', '--thin']) {
      expect((await sereInProcess(['effort', effortScenario('flags.yaml'), flag, '0'])).code).toBe(2);
    }
  });

  it('check says its tests read the records and its chain properties are of the true chain', async () => {
    const r = await sereInProcess(['check', SURVEYS, '--errors', ACCURACY, '--draws', '100', '--replicates', '19', '--seed', '2', '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).scales).toEqual({ tests: 'recorded', properties: 'true' });
    const plain = await sereInProcess(['check', SURVEYS, '--draws', '100', '--replicates', '19', '--seed', '2', '--json']);
    expect(JSON.parse(plain.stdout).scales).toBeUndefined();
    const table = await sereInProcess(['check', SURVEYS, '--errors', ACCURACY, '--draws', '100', '--replicates', '19', '--seed', '2']);
    expect(table.stdout).toContain('these tests read the records');
  }, 120_000);
});
