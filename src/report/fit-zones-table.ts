import type { ChalkInstance } from 'chalk';
import { siteCount, type Fit } from '../fit/fit.js';
import { zonePooling } from '../fit/zones.js';
import { zoneShifts } from '../fit/zones-json.js';
import { makeTable } from './style.js';
import { zoneQuantityName, zoneSamplerExtremes, zoneSamplerWorst, type ZoneSamplerRun } from '../fit/zone-sampler.js';

/**
 * The zones of a zoned fit, after its pooled table: per zone and from-state, the weight of the
 * shared row in the zone's row (partial pooling: κᵢ/(κᵢ + N_zi)) and the largest change of a cell
 * from the zone's own maximum-likelihood row; then the shared concentrations.
 */
export function fitZonesTable(fit: Fit, style: ChalkInstance): string {
  const zones = fit.zones!;
  const { states } = fit;
  const partial = zones.pooling === 'partial';
  const t = makeTable([zones.column, 'sites', 'transitions', ...states], style, ['left', 'right', 'right', ...states.map(() => 'right' as const)]);
  const shifts = zoneShifts(fit);
  zones.zones.forEach((zone, z) => {
    const s = shifts[z]!;
    t.push([zone.name, String(siteCount(zone.fit)), String(zone.fit.transitions),
      ...states.map((_, i) => (partial ? `${s.pull[i]!.toFixed(2)} (Δ ${s.change[i]!.toFixed(3)})` : 'own'))]);
  });
  const title = partial
    ? `Zones (column ${zones.column}), partially pooled: per from-state, the shared row's weight in the zone's row (Δ: largest change of a cell from the zone's own fit)`
    : `Zones (column ${zones.column}), not pooled: each zone its own fit (sere fit --by writes each one's matrix)`;
  const lines = ['', style.bold(title), t.toString()];
  if (partial) {
    const { kappa } = zonePooling(fit);
    lines.push(`how alike the zones are, κ per from-state (∞: no more unlike than sampling allows): ` +
      states.map((name, i) => `${name} ${Number.isFinite(kappa[i]!) ? kappa[i]!.toPrecision(3) : '∞'}`).join(', '));
    if (zones.sampler) lines.push(zoneSamplerLine(zones.sampler, states, zones.zones.map((z) => z.name)));
    lines.push('Partial pooling uses every pair, gapped ones completed by each zone\'s own fit; a forecast draws each zone\'s matrix from its posterior (sere forecast).');
  }
  return lines.join('\n') + '\n';
}

/** The zones' posterior sampler in one line: its run, and where R̂ and the ESS were worst. */
export function zoneSamplerLine(run: ZoneSamplerRun, states: readonly string[], zoneNames: readonly string[]): string {
  const { rhatMax, essMin } = zoneSamplerExtremes(run);
  const every = run.thin === 1 ? '' : ` (every ${run.thin === 2 ? 'second' : run.thin === 3 ? 'third' : `${run.thin}th`})`;
  const where = (key: 'rhat' | 'ess'): string => {
    const at = zoneSamplerWorst(run, key);
    return at ? ` (${zoneQuantityName(at, states, zoneNames)})` : '';
  };
  return `zone posterior sampler${run.augmented ? ' (data augmentation over the gaps)' : ''}: ${run.chains} chains × ${run.kept} sweeps kept${every} after ${run.warmUp} warm-up ` +
    `(seed ${run.seed}: the draws a forecast with this seed makes) · ` +
    (rhatMax === null ? 'no diagnostics (nothing varies, or one chain)' : `largest R̂ ${rhatMax.toFixed(4)}${where('rhat')} · smallest effective sample size ${Math.round(essMin!)}${where('ess')}`);
}
