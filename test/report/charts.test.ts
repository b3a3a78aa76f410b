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
});
