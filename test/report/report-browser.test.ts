import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { PNG } from 'pngjs';
import { chromium } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { sere } from '../cli/binary.js';
import { STATE_PALETTE } from '../../src/report/palette.js';

/** Debian's chromium (installed by .ci/run); elsewhere the test is skipped, saying so. */
const CHROMIUM = '/usr/bin/chromium';
const available = existsSync(CHROMIUM);
if (!available) console.warn(`report.html browser test skipped: no ${CHROMIUM} (apt-get install -y chromium)`);

/** Everything that could reach a network, off; a fresh profile each run. */
const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
  '--disable-component-update', '--disable-sync'];

describe.skipIf(!available)('report.html in a real browser', () => {
  it('renders offline to a non-blank page with the charts drawn, and prints on A4', async () => {
    const dir = join(mkdtempSync(join(tmpdir(), 'sere-report-')), 'ws');
    expect(sere(['init', dir]).code).toBe(0);
    for (const name of ['no-action.yaml', 'storm-surges.yaml', 'options.yaml']) {
      const file = join(dir, 'scenarios', name);
      writeFileSync(file, readFileSync(file, 'utf8').replace('draws: 4000', 'draws: 200'));
    }
    expect(sere(['season', dir, '--date', '2025-09-30']).code).toBe(0);
    const report = join(dir, 'records', '2025-09-30', 'report.html');
    const html = readFileSync(report, 'utf8');
    // Self-contained: no script, stylesheet link, image or font to fetch.
    expect(html).not.toMatch(/<script|<link|<img|@import|url\(/i);

    const profile = mkdtempSync(join(tmpdir(), 'sere-chromium-'));
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM, headless: true, args: FLAGS, viewport: { width: 794, height: 1123 },
    });
    try {
      const page = await context.newPage();
      const requests: string[] = [];
      page.on('request', (r) => requests.push(r.url()));
      const url = pathToFileURL(report).href;
      await page.goto(url, { waitUntil: 'load' });
      expect(requests).toEqual([url]);
      expect(await page.locator('svg').count()).toBe(4); // three fan charts and one differences chart
      expect(await page.locator('table').count()).toBeGreaterThanOrEqual(3);

      const shot = PNG.sync.read(await page.screenshot({ fullPage: true, path: join(dir, 'report.png') }));
      expect(shot.width).toBe(794);
      expect(shot.height).toBeGreaterThan(1123);
      const colours = new Map<number, number>();
      for (let i = 0; i < shot.data.length; i += 4) {
        const c = (shot.data[i]! << 16) | (shot.data[i + 1]! << 8) | shot.data[i + 2]!;
        colours.set(c, (colours.get(c) ?? 0) + 1);
      }
      const white = colours.get(0xffffff) ?? 0;
      expect(white / (shot.width * shot.height)).toBeLessThan(0.95);
      // The five states' colours, drawn by the browser from the inline SVG.
      for (const hex of STATE_PALETTE.slice(0, 5)) expect(colours.get(parseInt(hex.slice(1), 16)) ?? 0, hex).toBeGreaterThan(20);

      await page.emulateMedia({ media: 'print' });
      const pdf = (await page.pdf({ preferCSSPageSize: true })).toString('latin1');
      // A4 is 595.28 × 841.89 points.
      const box = /\/MediaBox\s*\[\s*0 0 ([\d.]+) ([\d.]+)\s*\]/.exec(pdf);
      expect(Number(box![1])).toBeCloseTo(595.28, 0);
      expect(Number(box![2])).toBeCloseTo(841.89, 0);
      expect(requests).toEqual([url]);
    } finally {
      await context.close();
    }
  });
});
