import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sere } from './binary.js';

const demo = 'scenarios/brenhollow/surveys.csv';
const demoFlags = ['--states', 'mudflat,pioneer,low-marsh,high-marsh,rank-grass', '--impossible', 'mudflat>high-marsh,rank-grass>mudflat'];

describe('sere check (built binary)', () => {
  it('reports the tests, structure, passage times, settling and sensitivities as documented JSON', () => {
    const r = sere(['check', demo, ...demoFlags, '--group-column', 'zone', '--draws', '200', '--seed', '4', '--target', 'high-marsh', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.format).toBe('sere-check');
    expect(j.tests.order.map((t: { name: string }) => t.name)).toEqual(['order 0 vs 1', 'order 1 vs 2']);
    expect(j.tests.order[0].df).toBe(16);
    expect(j.tests.order[0].p_g2).toBeLessThan(1e-100);
    expect(j.tests.order[1].sparse).toBe(true);
    expect(j.tests.order[1].p_bootstrap).toBeGreaterThan(0);
    expect(j.tests.order_selection.map((o: { order: number }) => o.order)).toEqual([0, 1, 2]);
    expect(j.tests.periods.strata).toHaveLength(9);
    expect(j.tests.groups.strata).toEqual(['north', 'south']);
    // One verdict per test; the period that differs most (no randomness: the counts decide), and
    // without it the other eight agree.
    expect(j.tests.verdicts.map((v: { test: string }) => v.test)).toEqual(['order 0 vs 1', 'order 1 vs 2', 'periods', 'groups']);
    expect(j.tests.verdicts.map((v: { evidence_against: boolean }) => v.evidence_against)).toEqual([true, false, false, false]);
    expect(j.tests.period_standout.ranked).toHaveLength(9);
    expect(j.tests.period_standout.ranked[0].period).toBe('2020→2021');
    expect(j.tests.period_standout.without_top.p).toBeGreaterThan(0.05);
    expect(j.tests.period_blocks).toBeNull();
    // κ per state: estimated for the four states that leave, none for rank-grass (never seen to leave).
    expect(j.variation['rank-grass']).toEqual({ status: 'never-left', kappa: null, kappa_mle: null, informative_periods: 7 });
    expect(j.variation['low-marsh'].status).toBe('estimated');
    expect(j.variation['low-marsh'].kappa.low).toBeLessThan(j.variation['low-marsh'].kappa.median);
    expect(j.structure).toMatchObject({ irreducible: false, transient: ['mudflat', 'pioneer', 'low-marsh', 'high-marsh'], absorbing: ['rank-grass'] });
    expect(j.residence['rank-grass'].point).toBeNull();
    // Residence 1 / (1 − pᵢᵢ) at the fit's MLE (by EM: the demo has pairs two and three steps apart;
    // from one-step counts alone it was 1 / (1 − 92/135)).
    const fit = JSON.parse(sere(['fit', demo, ...demoFlags, '--json']).stdout);
    expect(fit.estimation.method).toBe('em');
    expect(j.residence.mudflat.point).toBeCloseTo(1 / (1 - fit.probabilities[0][0]), 12);
    expect(j.mean_first_passage[0][0].draws).toBe(200);
    expect(j.absorption.closed_classes).toEqual([['rank-grass']]);
    expect(j.absorption.fundamental_matrix).toHaveLength(4);
    // t = N·1: the steps to absorption are the row sums of N (Kemeny & Snell 1960).
    j.absorption.fundamental_matrix.forEach((row: number[], a: number) =>
      expect(row.reduce((x, y) => x + y, 0)).toBeCloseTo(j.absorption.steps[a].point, 9));
    expect(j.absorption.ends[0][0].point).toBeCloseTo(1, 12);
    expect(j.settling.slem.median).toBeGreaterThan(0.8);
    expect(j.sensitivity.target).toEqual({ state: 'high-marsh', steps: 20 });
    // At the posterior mean: 25 cells less the two declared impossible.
    expect(j.sensitivity.transitions).toHaveLength(23);
    const top = j.sensitivity.transitions.sort((a: { horizon: number }, b: { horizon: number }) => Math.abs(b.horizon) - Math.abs(a.horizon))[0];
    expect([top.from, top.to]).toEqual(['rank-grass', 'high-marsh']);
  });

  it('groups periods when asked, and gives the same numbers for the same seed', () => {
    const args = ['check', demo, ...demoFlags, '--draws', '100', '--seed', '9', '--periods', '2015-2019,2020-2023', '--json'];
    const a = sere(args);
    expect(JSON.parse(a.stdout).tests.periods.strata).toEqual(['2015–2019 (to 2020)', '2020–2023 (to 2024)']);
    expect(sere(args).stdout).toBe(a.stdout);
  });

  it('checks a fit file too, and prints readable tables', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sere-'));
    const fit = join(dir, 'fit.json');
    expect(sere(['fit', demo, ...demoFlags, '--out', fit]).code).toBe(0);
    const r = sere(['check', fit, '--draws', '100', '--seed', '1']);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('Does the next state depend only on the current one?');
    expect(r.stdout).toContain('order 1 vs 2');
    expect(r.stdout).toContain('What the forecast hinges on');
  });

  const bad: [string, string[], string, number][] = [
    ['an unknown target', ['check', demo, '--target', 'woodland'], "--target: unknown state 'woodland'", 1],
    ['fit flags with a fit file', ['check', 'test/fixtures/fits/inconsistent.json', '--step', '2'], 'fit flags (step) apply to a survey table', 1],
    ['a label map with a fit file', ['check', 'test/fixtures/fits/inconsistent.json', '--labels', 'labels.yaml'], 'fit flags (labels) apply to a survey table', 1],
    ['malformed periods', ['check', demo, '--periods', '2019-2015'], 'expected ranges of start years', 2],
  ];
  for (const [what, args, message, code] of bad) {
    it(`${what}: exit ${code}, one clear line`, () => {
      const r = sere(args);
      expect(r.code).toBe(code);
      expect(r.stderr).toContain(message);
    });
  }
});
