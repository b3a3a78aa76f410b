import { compile, type TopLevelSpec } from 'vega-lite';
import { parse, View } from 'vega';

/**
 * Render a Vega-Lite spec to SVG headless (no browser, no canvas: vega's own SVG renderer). Vega
 * logs a dataflow error and carries on, which would leave a half-drawn chart in a record: errors
 * are collected and thrown instead, so a broken chart is an internal error, never a silent one.
 */
export async function renderSvg(spec: TopLevelSpec): Promise<string> {
  const errors: string[] = [];
  let level = 0;
  const logger = {
    level(value?: number) { if (value === undefined) return level; level = value; return logger; },
    error(...args: unknown[]) { errors.push(args.map(String).join(' ')); return logger; },
    warn() { return logger; },
    info() { return logger; },
    debug() { return logger; },
  };
  const view = new View(parse(compile(spec).spec), { renderer: 'none', logger: logger as never });
  const svg = await view.toSVG();
  view.finalize();
  if (errors.length > 0) throw new Error(`chart rendering failed: ${errors[0]}`);
  return svg;
}
