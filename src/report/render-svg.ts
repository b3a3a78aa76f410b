import { compile, type TopLevelSpec } from 'vega-lite';
import { parse, View } from 'vega';

/** Render a Vega-Lite spec to SVG headless (no browser, no canvas: vega's own SVG renderer). */
export async function renderSvg(spec: TopLevelSpec): Promise<string> {
  const view = new View(parse(compile(spec).spec), { renderer: 'none' });
  const svg = await view.toSVG();
  view.finalize();
  return svg;
}
