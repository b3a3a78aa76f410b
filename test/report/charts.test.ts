import { Resvg } from '@resvg/resvg-js';
import { describe, expect, it } from 'vitest';
import { fanChartSpec } from '../../src/report/charts.js';
import { renderSvg } from '../../src/report/render-svg.js';
import { runForecast } from '../../src/engine/forecast.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { fitWithCounts, scenarioFor } from '../helpers.js';

describe('fan charts', () => {
  const fit = fitWithCounts(['bare', 'grass', 'shrub'], [[40, 10, 0], [5, 30, 15], [2, 4, 36]]);
  const result = runForecast(scenarioFor(fit, { draws: 300 }), randomStreams(2));

  it('render to SVG headless, the same bytes every time, naming the states', async () => {
    const svg = await renderSvg(fanChartSpec([result], 'test chart'));
    expect(svg.startsWith('<svg')).toBe(true);
    for (const label of ['bare', 'grass', 'shrub', 'test chart']) expect(svg).toContain(label);
    expect(await renderSvg(fanChartSpec([result], 'test chart'))).toBe(svg);
  });

  it('rasterise to a non-blank PNG with resvg (an independent SVG renderer)', async () => {
    const svg = await renderSvg(fanChartSpec([result, { ...result, scenario: { ...result.scenario, alternative: 'other' } }], 'two'));
    const image = new Resvg(svg, { fitTo: { mode: 'width', value: 600 } }).render();
    expect(image.width).toBe(600);
    expect(image.height).toBeGreaterThan(100);
    const pixels = image.pixels;
    const colours = new Set<number>();
    for (let i = 0; i < pixels.length; i += 4 * 7) colours.add((pixels[i]! << 16) | (pixels[i + 1]! << 8) | pixels[i + 2]!);
    // Axes, grid, text, three coloured lines and bands: far more than a blank or one-colour image.
    expect(colours.size).toBeGreaterThan(30);
  });

  it('draw states named like Object.prototype members, and fail loudly (not half-drawn) on a broken spec', async () => {
    const names = ['__proto__', 'constructor', 'toString'];
    const odd = runForecast(scenarioFor(fitWithCounts(names, [[40, 10, 0], [5, 30, 15], [2, 4, 36]]), { draws: 100 }), randomStreams(3));
    const svg = await renderSvg(fanChartSpec([odd], 'odd names'));
    for (const label of names) expect(svg).toContain(label);
    // Panels by index, labelled by an expression naming the raw prototype names: vega logs
    // "Operator not defined" from inside the facet and would carry on; renderSvg must throw instead.
    const broken = fanChartSpec([odd], 'broken') as unknown as { facet: unknown; data: { values: { state: string; panel?: number }[] } };
    for (const v of broken.data.values) {
      v.state = v.state.replace('\u2060', '');
      v.panel = names.indexOf(v.state);
    }
    broken.facet = { field: 'panel', type: 'ordinal', header: { labelExpr: `${JSON.stringify(names)}[datum.value]` } };
    await expect(renderSvg(broken as never)).rejects.toThrow(/chart rendering failed/);
  });
});
