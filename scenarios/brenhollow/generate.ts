/**
 * Invented demo data for sere — nothing here is a real place, person or survey.
 *
 * Brenhollow Saltings is a fictional estuary where a sea wall was breached in 2014 to return
 * reclaimed grazing land to salt marsh. Sixty permanent plots (BH01–BH60) in two zones are
 * surveyed each summer from 2015 to 2024 and the plot's dominant cover is recorded as one of five
 * states. The surveys below are simulated from the "true" annual matrix TRUE_MATRIX with a fixed
 * seed; about 4% of surveys after the first are missed, which leaves some two-year gaps for sere to
 * report. Run `npm run demo:data` to regenerate `surveys.csv` (byte-identical for the same seed).
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import mt19937 from '@stdlib/random-base-mt19937';

export const STATES = ['mudflat', 'pioneer', 'low-marsh', 'high-marsh', 'rank-grass'] as const;

/** The "true" annual transition matrix, row = from, column = to (each row sums to 1). */
export const TRUE_MATRIX: readonly (readonly number[])[] = [
  // mudflat  pioneer  low-marsh  high-marsh  rank-grass
  [0.70, 0.25, 0.04, 0.00, 0.01], // mudflat: colonised by pioneer glassworts, or stays bare
  [0.10, 0.55, 0.32, 0.02, 0.01], // pioneer: builds up into low marsh, sometimes scoured back
  [0.03, 0.04, 0.78, 0.13, 0.02], // low-marsh: accretes into high marsh
  [0.01, 0.00, 0.04, 0.87, 0.08], // high-marsh: slowly invaded by rank grass
  [0.00, 0.00, 0.01, 0.09, 0.90], // rank-grass: persistent; occasionally knocked back by tides
];

/** Cover of the 60 plots at the first survey, one year after the breach. */
export const FIRST_SURVEY_MIX = [0.5, 0.25, 0.15, 0.07, 0.03];
export const SITES = 60;
export const FIRST_YEAR = 2015;
export const LAST_YEAR = 2024;
export const MISSED_SURVEY_CHANCE = 0.04;
export const SEED = 20140915;

/** Uniforms on [0, 1) (53-bit). */
interface Uniforms { uniform(): number }

function pick(random: Uniforms, probabilities: readonly number[]): number {
  let u = random.uniform();
  for (let s = 0; s < probabilities.length - 1; s++) {
    u -= probabilities[s]!;
    if (u < 0) return s;
  }
  return probabilities.length - 1;
}

export function generateSurveys(seed = SEED): string {
  // A plain MT19937 seeded by the number, not sere's named streams: the demo's survey table was
  // generated this way once and is fixed data, so changes to how sere derives its own streams
  // must not rewrite the demo (and every figure quoted from it).
  const generator = mt19937.factory({ seed }) as unknown as { normalized: () => number };
  const uniform = generator.normalized;
  uniform(); // the original run's gamma sampler took one uniform when it was made
  const random: Uniforms = { uniform: () => uniform() };
  const rows = ['site,time,state,zone'];
  for (let n = 1; n <= SITES; n++) {
    const site = `BH${String(n).padStart(2, '0')}`;
    const zone = n <= SITES / 2 ? 'north' : 'south';
    let state = pick(random, FIRST_SURVEY_MIX);
    for (let year = FIRST_YEAR; year <= LAST_YEAR; year++) {
      if (year > FIRST_YEAR) state = pick(random, TRUE_MATRIX[state]!);
      const missed = year > FIRST_YEAR && year < LAST_YEAR && random.uniform() < MISSED_SURVEY_CHANCE;
      if (!missed) rows.push(`${site},${year},${STATES[state]},${zone}`);
    }
  }
  return rows.join('\n') + '\n';
}

/**
 * The zoned demo (`zoned-surveys.csv`, `zoned.yaml`): the saltings' three invented zones — creekside
 * (scoured by the creeks: more mudflat and pioneer churn), midmarsh, and landward (rank grass
 * spreads faster) — 30 plots each (ZB01–ZB90), surveyed 2015–2024 like the main table, each zone
 * from its own true matrix. It tests partial pooling: the zones differ, by row, by a stated amount.
 */
export const ZONE_MATRICES: Readonly<Record<string, readonly (readonly number[])[]>> = {
  creekside: [
    [0.76, 0.20, 0.03, 0.00, 0.01],
    [0.18, 0.52, 0.27, 0.02, 0.01],
    [0.06, 0.06, 0.76, 0.10, 0.02],
    [0.02, 0.01, 0.07, 0.84, 0.06],
    [0.00, 0.00, 0.02, 0.10, 0.88],
  ],
  midmarsh: TRUE_MATRIX,
  landward: [
    [0.62, 0.30, 0.06, 0.00, 0.02],
    [0.06, 0.55, 0.34, 0.03, 0.02],
    [0.02, 0.03, 0.76, 0.16, 0.03],
    [0.00, 0.00, 0.03, 0.83, 0.14],
    [0.00, 0.00, 0.01, 0.05, 0.94],
  ],
};
export const ZONED_SEED = 20150601;
export const ZONED_SITES_PER_ZONE = 30;

export function generateZonedSurveys(seed = ZONED_SEED): string {
  const generator = mt19937.factory({ seed }) as unknown as { normalized: () => number };
  const random: Uniforms = { uniform: generator.normalized };
  const rows = ['site,time,state,zone'];
  let n = 0;
  for (const [zone, matrix] of Object.entries(ZONE_MATRICES)) {
    for (let s = 0; s < ZONED_SITES_PER_ZONE; s++) {
      n += 1;
      const site = `ZB${String(n).padStart(2, '0')}`;
      let state = pick(random, FIRST_SURVEY_MIX);
      for (let year = FIRST_YEAR; year <= LAST_YEAR; year++) {
        if (year > FIRST_YEAR) state = pick(random, matrix[state]!);
        const missed = year > FIRST_YEAR && year < LAST_YEAR && random.uniform() < MISSED_SURVEY_CHANCE;
        if (!missed) rows.push(`${site},${year},${STATES[state]},${zone}`);
      }
    }
  }
  return rows.join('\n') + '\n';
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  for (const [name, text] of [['surveys.csv', generateSurveys()], ['zoned-surveys.csv', generateZonedSurveys()]] as const) {
    const out = fileURLToPath(new URL(`../../../scenarios/brenhollow/${name}`, import.meta.url));
    writeFileSync(out, text);
    process.stderr.write(`wrote ${out}\n`);
  }
}
