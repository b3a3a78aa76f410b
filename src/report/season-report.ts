import { targetLabel, timingCell } from './target-lines.js';
import type { ForecastResult } from '../engine/forecast.js';
import type { Comparison } from '../engine/compare.js';
import { levelLabel, percent, percentBand, signed } from './numbers.js';
import { CAUTION } from './style.js';

/** One scenario file of a record: its forecasts, its comparison when it lists alternatives, its charts as SVG. */
export interface ReportSection {
  readonly file: string;
  readonly seed: number;
  readonly results: readonly ForecastResult[];
  readonly comparison?: Comparison;
  readonly charts: readonly string[];
}

export interface ReportInput {
  readonly workspace: string;
  readonly date: string;
  readonly toolVersion: string;
  readonly previous: string | null;
  readonly data: { readonly files: readonly string[]; readonly sha256: string; readonly sites: number; readonly transitions: number };
  readonly states: readonly string[];
  readonly sections: readonly ReportSection[];
}

/** Text into HTML: every label and name comes from the user's files. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

const cell = (text: string, tag = 'td'): string => `<${tag}>${escapeHtml(text)}</${tag}>`;
const row = (cells: readonly string[], head = false): string => `<tr>${cells.map((c, n) => cell(c, head || n === 0 ? 'th' : 'td')).join('')}</tr>`;
const table = (head: readonly string[], body: readonly (readonly string[])[]): string =>
  `<table><thead>${row(head, true)}</thead><tbody>${body.map((r) => row(r)).join('')}</tbody></table>`;

const nameOf = (r: ForecastResult): string => r.scenario.alternative ?? r.scenario.name;
const points = (x: number): string => signed(Math.round(x * 1000) / 10, 1);

/** Shares at the shown years, one row per state (one forecast) or per state at the horizon by alternative. */
function sharesTable(s: ReportSection): string {
  const first = s.results[0]!;
  const sc = first.scenario;
  if (s.results.length === 1) {
    const at = sc.showSteps.map((t) => first.steps.indexOf(t));
    return table(['state', ...at.map((t) => String(first.years[t]))], sc.fit.states.map((state, k) =>
      [state, ...at.map((t) => percentBand({ median: first.shares[k]!.median[t]!, low: first.shares[k]!.low[t]!, high: first.shares[k]!.high[t]! }))]));
  }
  const h = first.years.length - 1;
  const head = ['state', ...s.results.map((r) => `${nameOf(r)}, ${first.years[h]}`)];
  const alternatives = s.comparison?.alternatives ?? [];
  return table(head, sc.fit.states.map((state, k) => [state, ...s.results.map((r, n) => {
    const share = percentBand({ median: r.shares[k]!.median[h]!, low: r.shares[k]!.low[h]!, high: r.shares[k]!.high[h]! });
    const d = n > 0 ? alternatives[n - 1]?.atHorizon[k] : undefined;
    return d ? `${share} (${points(d.median)} [${points(d.low)} – ${points(d.high)}] pts)` : share;
  })]));
}

/** The landscape target, for each forecast: threshold, chance within the horizon, first year. */
function targetLines(s: ReportSection): string {
  const sc = s.results[0]!.scenario;
  if (!sc.target) return '';
  const horizon = s.results[0]!.years[s.results[0]!.years.length - 1]!;
  const body = s.results.map((r) => {
    const t = r.dominance!;
    return [nameOf(r), t.alreadyMet ? `already met in ${sc.start.year}` : `${percent(t.probability)}%`,
      t.alreadyMet && !t.year ? '—' : timingCell(t.year, t.draws), `${percent(t.holdsAtHorizon)}% · ${percent(t.holdsThroughout)}%`];
  });
  return `<p class="target">Landscape target: ${escapeHtml(targetLabel(sc.target, sc.fit.states, sc.fit.step))}, by ${horizon}.</p>`
    + table(['scenario', 'chance it is reached', 'first year (draws)', `holds in ${horizon} · every year`], body);
}

function section(s: ReportSection): string {
  const first = s.results[0]!;
  const sc = first.scenario;
  const title = s.results.length > 1 ? `${s.file}: ${s.results.length} alternatives (baseline: ${nameOf(first)})` : sc.name;
  const band = levelLabel(sc.level);
  const what = s.results.length > 1
    ? `Share of the area at the horizon, % — median [${band}]; beside each alternative its difference from the baseline in points.`
    : `Share of the area, % — median [${band}].`;
  return `<section><h2>${escapeHtml(title)}</h2>
<p class="meta">file ${escapeHtml(s.file)} · ${escapeHtml(sc.source)} · ${first.draws} draws · seed ${s.seed}</p>
${s.charts.map((svg) => `<figure>${svg}</figure>`).join('\n')}
<p class="what">${escapeHtml(what)}</p>
${sharesTable(s)}
${targetLines(s)}
</section>`;
}

/** A4, printable: charts scale to the page width, sections are not split across pages. */
const STYLE = `
@page { size: A4; margin: 12mm; }
* { box-sizing: border-box; }
body { font: 10pt/1.35 sans-serif; color: #111; margin: 0 auto; max-width: 186mm; padding: 6mm 0; background: #fff; }
h1 { font-size: 15pt; margin: 0 0 2mm; }
h2 { font-size: 12pt; margin: 5mm 0 1mm; }
p { margin: 1mm 0; }
.meta, .what, .caution { color: #444; font-size: 9pt; }
.hash { font-family: monospace; font-size: 8pt; word-break: break-all; }
figure { margin: 2mm 0; }
figure svg { max-width: 100%; height: auto; display: block; }
table { border-collapse: collapse; margin: 1mm 0 2mm; font-size: 8.5pt; }
th, td { border-bottom: 1px solid #ddd; padding: 0.6mm 2mm; text-align: right; }
th:first-child, thead th { text-align: left; }
section { break-inside: avoid; page-break-inside: avoid; }
.caution { border-top: 1px solid #999; margin-top: 4mm; padding-top: 2mm; }
@media print { body { padding: 0; } }
`;

/**
 * The record's one-page report (report.html): what was run on which data, each scenario file's
 * charts and tables, the target, the seeds, the data's SHA-256 and the caution line. Entirely
 * self-contained — styles inline, charts inline as SVG, no script, no link or font to fetch — so
 * it opens offline and prints the same anywhere.
 */
export function seasonReportHtml(r: ReportInput): string {
  const seeds = r.sections.map((s) => `${s.file}: ${s.seed}`).join(' · ');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(`${r.workspace} — record ${r.date}`)}</title>
<style>${STYLE}</style>
</head>
<body>
<header>
<h1>${escapeHtml(r.workspace)} — season record ${escapeHtml(r.date)}</h1>
<p class="meta">sere ${escapeHtml(r.toolVersion)} · previous record: ${escapeHtml(r.previous ?? 'none')} · states: ${escapeHtml(r.states.join(', '))}</p>
<p class="meta">data: ${escapeHtml(r.data.files.join(', '))} · ${r.data.sites} sites · ${r.data.transitions} transitions</p>
<p class="meta">data SHA-256: <span class="hash">${escapeHtml(r.data.sha256)}</span></p>
<p class="meta">seeds: ${escapeHtml(seeds)}</p>
</header>
${r.sections.map(section).join('\n')}
<p class="caution">${escapeHtml(CAUTION)}</p>
</body>
</html>
`;
}
