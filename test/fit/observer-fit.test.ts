import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { heathSurveysByObserver, STATES } from '../../scripts/heath-fixture.js';
import { readSurveyCsv } from '../../src/data/read-survey-csv.js';
import type { ErrorEstimate } from '../../src/chain/error-em.js';
import { fitMle, fitSurvey } from '../../src/fit/fit.js';
import { DEFAULT_FIT_SETTINGS } from '../../src/fit/fit-from-file.js';
import { estimateFit } from '../../src/fit/estimate.js';
import { fitToJson } from '../../src/fit/fit-json.js';
import { loadFit } from '../../src/fit/load-fit.js';
import { surveyReadOptions, type FitSettings } from '../../src/fit/settings.js';
import { sampleLatent } from '../../src/uncertainty/augment.js';
import { posteriorDraws } from '../../src/uncertainty/posterior.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { sereInProcess } from '../cli/in-process.js';
import { errorOf, quantile7, tempFiles } from '../helpers.js';

const SURVEYS = 'test/fixtures/heath/surveys-two-observers.csv';
const ACCURACY = 'test/fixtures/heath/accuracy-by-observer.csv';
const SETTINGS: FitSettings = { ...DEFAULT_FIT_SETTINGS, states: [...STATES], impossible: [['mature-heath', 'bare-peat']], errors: ACCURACY };
const SAMPLER = ['--seed', '4', '--chains', '2', '--warm-up', '40', '--retained', '60', '--thin', '1'];
const { dir, write } = tempFiles('sere-observer-fit-');
const k = STATES.length;
const YH = STATES.indexOf('young-heath');
const GR = STATES.indexOf('grassland');

const fitOf = (settings: FitSettings = SETTINGS) => fitSurvey(readSurveyCsv(SURVEYS, surveyReadOptions(settings)), settings);

describe('two observers, Corran recording young heath as grassland one visit in ten, Avery never (scripts/heath-fixture.ts)', () => {
  it('is the generator output, byte for byte', () => {
    const { surveys, assessment } = heathSurveysByObserver();
    expect(readFileSync(SURVEYS, 'utf8')).toBe(surveys);
    expect(readFileSync(ACCURACY, 'utf8')).toBe(assessment);
  });

  it('reads the observer column by default with --errors, one matrix per observer', () => {
    const fit = fitOf();
    const model = fit.errorModel!;
    expect(model.observers!.names).toEqual(['Avery', 'Corran']);
    expect(model.observers!.unassessed).toEqual([]);
    expect(model.observers!.notSurveyed).toEqual([]);
    // Without --errors the column is not read.
    expect(readSurveyCsv(SURVEYS, surveyReadOptions({ ...SETTINGS, errors: undefined })).observers).toBeUndefined();
    const mle = fitMle(fit) as ErrorEstimate;
    expect(mle.converged).toBe(true);
    expect(mle.emission).toHaveLength(3 * k * k);
  });

  it('recovers Corran\'s rate within its 90% band, and Avery\'s band stays below it', () => {
    const unsampled = fitOf();
    const sample = sampleLatent(unsampled, { chains: 2, warmUp: 100, retained: 400, thin: 1 }, randomStreams(21).stream('augment'));
    const own = sample.errors!.observers!;
    const rate = (o: number): number[] => Array.from({ length: sample.retained }, (_, r) => own.emissions[(r * 2 + o) * k * k + YH * k + GR]!);
    const corran = rate(1);
    const avery = rate(0);
    // Truth 0.1 (MISLABEL_CHANCE); the band is the posterior's own, not a tolerance.
    expect(quantile7(corran, 0.05)).toBeLessThan(0.1);
    expect(quantile7(corran, 0.95)).toBeGreaterThan(0.1);
    expect(quantile7(avery, 0.95)).toBeLessThan(0.05);
    // The pooled matrix (every assessed count) lies between the two.
    const pooled = Array.from({ length: sample.retained }, (_, r) => sample.errors!.emissions[r * k * k + YH * k + GR]!);
    const mean = (x: number[]): number => x.reduce((a, b) => a + b, 0) / x.length;
    expect(mean(pooled)).toBeGreaterThan(mean(avery));
    expect(mean(pooled)).toBeLessThan(mean(corran));
  });

  it('writes a fit file that reads back to the same MLE, observer matrices and posterior draws', () => {
    const unsampled = fitOf();
    const fit = { ...unsampled, latentSample: sampleLatent(unsampled, { chains: 2, warmUp: 20, retained: 30, thin: 1 }, randomStreams(11).stream('augment')) };
    const json = fitToJson(fit, estimateFit(fit, 0.9)) as { error_model: { observers: { name: string }[] }; posterior_sampler: { observer_error_matrices: number[][][] } };
    expect(json.error_model.observers.map((o) => o.name)).toEqual(['Avery', 'Corran']);
    expect(json.posterior_sampler.observer_error_matrices).toHaveLength(30);
    expect(json.posterior_sampler.observer_error_matrices[0]).toHaveLength(2);
    const file = join(dir, 'fit.json');
    writeFileSync(file, JSON.stringify(json));
    const loaded = loadFit(file);
    expect(Array.from((fitMle(loaded) as ErrorEstimate).emission)).toEqual(Array.from((fitMle(fit) as ErrorEstimate).emission));
    expect(Array.from(loaded.latentSample!.errors!.observers!.emissions)).toEqual(Array.from(fit.latentSample.errors!.observers!.emissions));
    const a = posteriorDraws(fit, 20, randomStreams(3).stream('p'));
    const b = posteriorDraws(loaded, 20, randomStreams(3).stream('p'));
    expect(Array.from(b.data)).toEqual(Array.from(a.data));
    expect(Array.from(b.emissions!)).toEqual(Array.from(a.emissions!));
  });

  it('refuses a fit file whose observers do not add up to the pooled assessment, at the key', () => {
    const unsampled = fitOf();
    const fit = { ...unsampled, latentSample: sampleLatent(unsampled, { chains: 2, warmUp: 5, retained: 8, thin: 1 }, randomStreams(11).stream('augment')) };
    const json = fitToJson(fit, estimateFit(fit, 0.9)) as { error_model: { observers: { assessment: number[][] }[] } };
    json.error_model.observers[1]!.assessment[YH]![GR] += 1;
    const file = join(dir, 'tampered.json');
    writeFileSync(file, JSON.stringify(json));
    const err = errorOf(() => loadFit(file));
    expect(err.code).toBe('BAD_FIT_FILE');
    expect(err.place.path).toBe(`error_model.assessment[${YH}][${GR}]`);
  });
});

describe('observers at the door', () => {
  const surveys = readFileSync(SURVEYS, 'utf8');
  const lines = surveys.split('\n');
  /** The (1-based) line of the n-th row ending with `end`. */
  const nthLine = (end: string, n: number): number => lines.map((l, at) => (l.endsWith(end) ? at + 1 : 0)).filter((at) => at > 0)[n - 1]!;
  const withLine = (line: number, change: (l: string) => string): string => lines.map((l, at) => (at + 1 === line ? change(l) : l)).join('\n');

  it('a surveyed observer the assessment does not name: the pooled matrix, a warning, and pooled_for in the JSON', async () => {
    // Line 2's survey (and every other of that observer's) is by someone new.
    const renamed = write('new-observer.csv', lines.map((l, n) => (n > 0 && n % 50 === 1 ? l.replace(/,(Avery|Corran)$/, ',Dana') : l)).join('\n'));
    const r = await sereInProcess(['fit', renamed, '--errors', ACCURACY, '--impossible', 'mature-heath>bare-peat', '--json', ...SAMPLER]);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/warning: observer Dana is not in the error matrix/);
    const json = JSON.parse(r.stdout);
    expect(json.error_model.pooled_for).toEqual(['Dana']);
    expect(json.error_model.pooled_surveys).toBe(lines.filter((l, n) => n > 0 && n % 50 === 1 && l !== '').length);
  });

  it('an assessed observer who made no survey is fine (a note), and an assessment without observers is one shared matrix', () => {
    const extra = write('extra-observer.csv', `${readFileSync(ACCURACY, 'utf8')}Edda,grassland,grassland,5\n`);
    const fit = fitOf({ ...SETTINGS, errors: extra });
    expect(fit.errorModel!.observers!.notSurveyed).toEqual(['Edda']);
    const plain = write('plain.csv', 'recorded,verified,n\n' + STATES.map((s) => `${s},${s},10`).join('\n') + '\nyoung-heath,young-heath,2\n'.replace('young-heath,young-heath', 'grassland,young-heath'));
    expect(fitOf({ ...SETTINGS, errors: plain }).errorModel!.observers).toBeUndefined();
  });

  const refused: [string, () => string, string[], string, { file: () => string; line?: number; column?: number }][] = [
    // Every Corran survey spelled 'corran ': the assessment's Corran is meant (the name is trimmed, so the case differs).
    ['a surveyed name that is an assessed one in another case', () => write('case.csv', surveys.replace(/,Corran\n/g, ',corran \n')), [], 'OBSERVER_LOOK_ALIKE',
      { file: () => join(dir, 'case.csv'), line: nthLine(',Corran', 1), column: 4 }],
    // Avery's second survey spelled 'AVERY': refused there, before the assessment is consulted.
    ['two spellings of one surveyed observer', () => write('two-spellings.csv', withLine(nthLine(',Avery', 2), (l) => l.replace(/,Avery$/, ',AVERY'))), [], 'OBSERVER_LOOK_ALIKE',
      { file: () => join(dir, 'two-spellings.csv'), line: nthLine(',Avery', 2), column: 4 }],
    ['an empty observer cell', () => write('empty.csv', withLine(nthLine(',Avery', 1), (l) => l.replace(/,Avery$/, ','))), [], 'EMPTY_VALUE',
      { file: () => join(dir, 'empty.csv'), line: nthLine(',Avery', 1), column: 4 }],
    ['an assessment naming observers for a table without an observer column', () => write('no-column.csv', lines.map((l) => l.replace(/,[^,]*$/, '')).join('\n')), [], 'MISSING_COLUMN',
      { file: () => join(dir, 'no-column.csv'), line: 1 }],
    ['an observer column for a wide table', () => write('wide.csv', 'site,observer,2019,2020\nQ1,Avery,grassland,grassland\nQ2,Corran,young-heath,grassland\n'), ['--observer-column', 'observer'], 'BAD_OPTION',
      { file: () => join(dir, 'wide.csv'), line: 1 }],
    ['an observer column named but not in the table', () => SURVEYS, ['--observer-column', 'surveyor'], 'MISSING_COLUMN', { file: () => SURVEYS, line: 1 }],
  ];
  for (const [what, file, flags, code, at] of refused) {
    it(`refuses ${what}: ${code}, one line with its place, exit 1, nothing written`, async () => {
      const out = join(dir, `never-${code}.json`);
      const r = await sereInProcess(['fit', file(), '--errors', ACCURACY, ...flags, '--out', out, '--debug', ...SAMPLER]);
      expect(r.code).toBe(1);
      expect(r.stderr).toContain(`[${code}]`);
      expect(r.stderr).toContain(`${at.file()}:${at.line ?? ''}${at.column !== undefined ? `:${at.column}` : ''}`);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(existsSync(out)).toBe(false);
    });
  }
});

describe('a scenario with one error matrix per observer', () => {
  const { write: put } = tempFiles('sere-observer-scenario-');
  put('accuracy.csv', readFileSync(ACCURACY, 'utf8'));
  // The observer column under another name, given by fit.columns.observer.
  const data = put('surveys.csv', readFileSync(SURVEYS, 'utf8').replace('site,time,state,observer', 'site,time,state,surveyor'));
  const scenario = (name: string, columns: string, plots: string) => put(name, [
    `name: ${name}`, `data: ${data}`, `fit: { errors: accuracy.csv, impossible: [mature-heath>bare-peat]${columns} }`,
    'horizon: { years: 3 }', 'variation: none', 'uncertainty: { source: posterior, draws: 100, seed: 3 }', `plots: ${plots}`,
  ].join('\n') + '\n');

  it('reads fit.columns.observer, and forecasts plots as recorded through the pooled matrix', async () => {
    const recorded = await sereInProcess(['forecast', scenario('rec.yaml', ', columns: { observer: surveyor }', '{ count: 100, as: recorded }'), '--json']);
    expect(recorded.code).toBe(0);
    const truth = await sereInProcess(['forecast', scenario('true.yaml', ', columns: { observer: surveyor }', '{ count: 100, as: true }'), '--json']);
    const mean = (stdout: string, state: string): number => JSON.parse(stdout).scenarios[0].plots[state].mean[0];
    // The pooled matrix records some young heath as grassland: fewer recorded than true.
    expect(mean(recorded.stdout, 'young-heath')).toBeLessThan(mean(truth.stdout, 'young-heath'));
    expect(mean(recorded.stdout, 'grassland')).toBeGreaterThan(mean(truth.stdout, 'grassland'));
  });

  it('records plots through one observer\'s own matrix with plots.observer', async () => {
    const plotsBy = async (name: string, observer: string): Promise<{ observer: string | null; 'young-heath': { mean: number[] }; grassland: { mean: number[] } }> => {
      const r = await sereInProcess(['forecast', scenario(name, ', columns: { observer: surveyor }', `{ count: 100, as: recorded, observer: ${observer} }`), '--json']);
      expect(r.code, r.stderr).toBe(0);
      return JSON.parse(r.stdout).scenarios[0].plots;
    };
    const corran = await plotsBy('corran.yaml', 'Corran');
    // Matched as the assessment's names are: case and spacing aside.
    const avery = await plotsBy('avery.yaml', "' avery'");
    expect([corran.observer, avery.observer]).toEqual(['Corran', 'Avery']);
    // Corran records about a tenth of young heath as grassland (the fixture's mislabelling), Avery none:
    // on the same true plots (the same draws and true counts), Corran's records hold fewer young heath.
    const years = corran['young-heath'].mean.length;
    for (let t = 0; t < years; t++) {
      expect(corran['young-heath'].mean[t]!).toBeLessThan(avery['young-heath'].mean[t]!);
      expect(corran.grassland.mean[t]!).toBeGreaterThan(avery.grassland.mean[t]!);
    }
  });

  const refusedObserver: [string, string][] = [
    ['{ count: 100, as: recorded, observer: Dana }', 'not in the accuracy assessment'],
    ['{ count: 100, observer: Corran }', 'as: recorded'],
  ];
  for (const [plots, why] of refusedObserver) {
    it(`refuses plots ${plots}: BAD_SCENARIO at plots.observer`, async () => {
      const r = await sereInProcess(['forecast', scenario('bad-observer.yaml', ', columns: { observer: surveyor }', plots), '--debug']);
      expect(r.code).toBe(1);
      expect(r.stderr).toContain('[BAD_SCENARIO]');
      expect(r.stderr).toMatch(/bad-observer\.yaml:7:\d+ \(plots\.observer\)/);
      expect(r.stderr).toContain(why);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
    });
  }

  it('without fit.columns.observer (no column named observer here), the assessment\'s observers are refused at the data', async () => {
    const r = await sereInProcess(['forecast', scenario('none.yaml', '', '40'), '--debug']);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('[MISSING_COLUMN]');
    // The CLI prints the path relative to the working folder when that is shorter: match its end.
    expect(r.stderr).toContain(`${basename(data)}:1:`);
  });
});

describe('several survey tables read as one (a workspace\'s seasons)', () => {
  it('keep each survey\'s observer, renumbered into the union of the tables\' observers', async () => {
    const { readSurveyTables } = await import('../../src/data/read-survey-tables.js');
    const text = readFileSync(SURVEYS, 'utf8').split('\n');
    const header = text[0]!;
    const body = text.slice(1).filter((l) => l !== '');
    // Before 2020 and from 2020 on; Corran's surveys in the first table renamed, so the tables name different observers.
    const early = write('early.csv', [header, ...body.filter((l) => Number(l.split(',')[1]) < 2020).map((l) => l.replace(/,Corran$/, ',Dana'))].join('\n') + '\n');
    const late = write('late.csv', [header, ...body.filter((l) => Number(l.split(',')[1]) >= 2020)].join('\n') + '\n');
    const table = readSurveyTables([early, late], surveyReadOptions(SETTINGS));
    const { rows, observers } = table;
    expect([...observers!].sort()).toEqual(['Avery', 'Corran', 'Dana']);
    let checked = 0;
    for (let n = 0; n < rows.count; n++) {
      const name = observers![rows.observer![n]!]!;
      if (rows.time[n]! < 2020) expect(name === 'Avery' || name === 'Dana').toBe(true);
      else expect(name === 'Avery' || name === 'Corran').toBe(true);
      checked += 1;
    }
    expect(checked).toBe(body.length);
  });
});

describe('an observer column read but not used', () => {
  it('with an error matrix without observers, empty observer cells are no problem (one shared matrix)', () => {
    const { write: put } = tempFiles('sere-observer-unused-');
    const text = readFileSync(SURVEYS, 'utf8').replace(/,Avery\n/g, ',\n');
    const data = put('blank.csv', text);
    const plain = put('plain.csv', 'recorded,verified,n\n' + STATES.map((s) => `${s},${s},10`).join('\n') + '\ngrassland,young-heath,2\n');
    const settings = { ...SETTINGS, errors: plain };
    const table = readSurveyCsv(data, surveyReadOptions(settings));
    expect(table.observers).toContain('');
    expect(fitSurvey(table, settings).errorModel!.observers).toBeUndefined();
  });
});

describe('a confusion only another observer\'s assessment saw', () => {
  it('is possible for every observer in EM too: a record only it explains gives a finite MLE (it gave NaN)', async () => {
    const { write: put } = tempFiles('sere-observer-support-');
    // Only Corran's assessment saw true b recorded as a; Avery records b then a, and b>a is impossible,
    // so the only explanation is Avery recording true b as a — a cell of Avery's matrix its own assessment left at 0.
    const accuracy = put('acc.csv', 'observer,recorded,verified,n\nAvery,a,a,60\nAvery,b,b,60\nCorran,a,a,60\nCorran,a,b,6\nCorran,b,b,54\n');
    const rows = ['site,time,state,observer'];
    for (let s = 0; s < 40; s++) rows.push(`S${s},2000,a,${s % 2 ? 'Avery' : 'Corran'}`, `S${s},2001,${s % 3 ? 'a' : 'b'},${s % 2 ? 'Avery' : 'Corran'}`);
    rows.push('T,2000,b,Avery', 'T,2001,a,Avery');
    const surveys = put('surveys.csv', rows.join('\n') + '\n');
    const r = await sereInProcess(['fit', surveys, '--errors', accuracy, '--states', 'a,b', '--impossible', 'b>a', '--json', ...SAMPLER]);
    expect(r.code, r.stderr).toBe(0);
    const fit = JSON.parse(r.stdout);
    expect(Number.isFinite(fit.estimation.log_likelihood)).toBe(true);
    // The MLE is fitted, not the prior mean [0.5, 0.5] that a NaN likelihood left: about a third of a's leave.
    expect(fit.probabilities[0][1]).toBeGreaterThan(0.2);
    expect(fit.probabilities[0][1]).toBeLessThan(0.5);
  });
});
