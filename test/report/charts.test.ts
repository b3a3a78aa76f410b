import { Resvg } from '@resvg/resvg-js';
import { describe, expect, it } from 'vitest';
import { differenceChartSpec, domainOf, fanChartSpec } from '../../src/report/charts.js';
import { renderSvg } from '../../src/report/render-svg.js';
import { STATE_PALETTE } from '../../src/report/palette.js';
import { wilsonInterval } from '../../src/evaluation/wilson.js';
import { runForecast } from '../../src/engine/forecast.js';
import { runComparison } from '../../src/engine/compare.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import type { Fit } from '../../src/fit/fit.js';
import { atLeast, fitWithCounts, scenarioFor, treatmentOf } from '../helpers.js';

/** Rasterise with resvg (an independent SVG renderer) on white. */
function raster(svg: string): { width: number; height: number; pixels: Buffer } {
  const image = new Resvg(svg, { fitTo: { mode: 'zoom', value: 1 }, background: 'white' }).render();
  return { width: image.width, height: image.height, pixels: image.pixels };
}

/** Pixels within a small distance of a colour: lines are anti-aliased, their centres are not. */
function pixelsNear(pixels: Buffer, hex: string, tolerance = 24): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16)) as [number, number, number];
  let n = 0;
  for (let i = 0; i < pixels.length; i += 4) {
    if (Math.abs(pixels[i]! - r) + Math.abs(pixels[i + 1]! - g) + Math.abs(pixels[i + 2]! - b) <= tolerance) n += 1;
  }
  return n;
}

/** Every y-scale domain in a spec, in panel order. */
function yDomains(spec: unknown): [number, number][] {
  const out: [number, number][] = [];
  JSON.stringify(spec, (key, value: unknown) => {
    if (key === 'y' && value && typeof value === 'object' && 'scale' in value) out.push((value as { scale: { domain: [number, number] } }).scale.domain);
    return value;
  });
  return out;
}

describe('Wilson score interval', () => {
  it('matches published values', () => {
    // Newcombe (1998, Stat Med 17:857, table I): 81/263 → 0.2553–0.3662; 0/10 → 0–0.2775 (95%).
    const a = wilsonInterval(81, 263, 0.95);
    expect(a.low).toBeCloseTo(0.2553, 4);
    expect(a.high).toBeCloseTo(0.3662, 4);
    const b = wilsonInterval(0, 10, 0.95);
    expect(b.low).toBe(0);
    expect(b.high).toBeCloseTo(0.2775, 4);
  });
});

describe('charts', () => {
  const base = fitWithCounts(['bare', 'grass', 'a shrub state with a long name'], [[40, 10, 0], [5, 30, 15], [2, 4, 36]]);
  // Three surveys of 20 sites before the start year 2000, ending at the starting mix.
  const fit: Fit = { ...base, latest: { ...base.latest, counts: [10, 6, 4], shares: [0.5, 0.3, 0.2], sites: 20 },
    history: [{ time: 1998, counts: [16, 3, 1], sites: 20 }, { time: 1999, counts: [13, 5, 2], sites: 20 }, { time: 2000, counts: [10, 6, 4], sites: 20 }] };
  const scenario = scenarioFor(fit, { draws: 300, target: atLeast(2, 0.35), alternative: 'nothing', horizonSteps: 10 });
  const result = runForecast(scenario, randomStreams(2));
  const managed = { ...scenario, alternative: 'push grass on to shrub', treatments: [treatmentOf(1, { kind: 'multiply', cells: [{ to: 2, value: 3 }] }, 10)] };
  const comparison = runComparison([scenario, managed], randomStreams(2), undefined, { everyYear: true });

  it('scale each panel to its data, with the history and the target inside', () => {
    const spec = fanChartSpec([result], 'test chart');
    const domains = yDomains(spec);
    const byPanel = [...new Set(domains.map((d) => d.join()))];
    expect(byPanel.length).toBe(3);
    // bare: surveyed 80% in 1998, whose Wilson interval reaches higher still.
    const bare = domains[0]!;
    expect(bare[1]).toBeGreaterThanOrEqual(Math.ceil(wilsonInterval(16, 20, 0.9).high * 100));
    expect(bare[1]).toBeLessThanOrEqual(100);
    // The shrub panel holds the 35% target rule.
    const shrub = domains[domains.length - 1]!;
    expect(shrub[0]).toBeLessThan(35);
    expect(shrub[1]).toBeGreaterThan(35);
    expect(domainOf([10, 30], [0, 100])).toEqual([9, 31]);
    expect(domainOf([0, 99.5], [0, 100])).toEqual([0, 100]);
  });

  it('render the same bytes every time, naming every state in full', async () => {
    const svg = await renderSvg(fanChartSpec([result], 'test chart'));
    expect(svg.startsWith('<svg')).toBe(true);
    for (const label of ['bare', 'grass', 'a shrub state with a long name', 'test chart', 'target: at least 35%']) expect(svg).toContain(label);
    expect(await renderSvg(fanChartSpec([result], 'test chart'))).toBe(svg);
  });

  it('rasterise to non-blank pictures where each state keeps its colour across the fan and difference charts', async () => {
    const fan = raster(await renderSvg(fanChartSpec([comparison.baseline, comparison.alternatives[0]!.result], 'two', { baseline: true })));
    const diff = raster(await renderSvg(differenceChartSpec(comparison, 'differences')));
    // Two rows of three panels, and a strip of one panel per state.
    expect(fan.width).toBeGreaterThan(500);
    expect(fan.height).toBeGreaterThan(250);
    expect(diff.width).toBeGreaterThan(400);
    expect(diff.height).toBeGreaterThan(60);
    for (const image of [fan, diff]) {
      const white = pixelsNear(image.pixels, '#ffffff', 0);
      const total = image.pixels.length / 4;
      expect(white / total).toBeLessThan(0.97);
      expect(white / total).toBeGreaterThan(0.4);
      // The three states' colours, and not the fourth palette colour (there is no fourth state).
      for (const colour of STATE_PALETTE.slice(0, 3)) expect(pixelsNear(image.pixels, colour), colour).toBeGreaterThan(30);
      expect(pixelsNear(image.pixels, STATE_PALETTE[3])).toBe(0);
    }
  });

  it('chart differences at the horizon, even when the horizon is not a shown year', () => {
    const c = runComparison([{ ...scenario, showSteps: [0, 5] }, { ...managed, showSteps: [0, 5] }], randomStreams(2));
    const spec = JSON.stringify(differenceChartSpec(c, 'd'));
    expect(spec).toContain('in 2010');
    const alt = c.alternatives[0]!;
    // Pushing grass on to shrub: more shrub and less grass at the horizon in most draws.
    expect(alt.atHorizon[2]!.median).toBeGreaterThan(0);
    expect(alt.atHorizon[1]!.median).toBeLessThan(0);
    expect(alt.atHorizon[2]!.low).toBeLessThanOrEqual(alt.atHorizon[2]!.median);
    expect(alt.atHorizon[2]!.high).toBeGreaterThanOrEqual(alt.atHorizon[2]!.median);
  });

  it('draw states named like Object.prototype members, and fail loudly (not half-drawn) on a broken spec', async () => {
    const names = ['__proto__', 'constructor', 'toString'];
    const odd = runForecast(scenarioFor(fitWithCounts(names, [[40, 10, 0], [5, 30, 15], [2, 4, 36]]), { draws: 100 }), randomStreams(3));
    const svg = await renderSvg(fanChartSpec([odd], 'odd names'));
    for (const label of names) expect(svg).toContain(label);
    // Panels by index, labelled by an expression naming the raw prototype names: vega logs
    // "Operator not defined" from inside the facet and would carry on; renderSvg must throw instead.
    const broken = {
      data: { values: names.map((_, panel) => ({ panel, year: 2000, share: 10 })) },
      facet: { field: 'panel', type: 'ordinal', header: { labelExpr: `${JSON.stringify(names)}[datum.value]` } },
      spec: { mark: 'point', encoding: { x: { field: 'year', type: 'quantitative' }, y: { field: 'share', type: 'quantitative' } } },
    };
    await expect(renderSvg(broken as never)).rejects.toThrow(/chart rendering failed/);
  });
});
