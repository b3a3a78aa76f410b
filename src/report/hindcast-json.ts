import type { HindcastCase, HindcastSummary } from '../evaluation/hindcast.js';
import { TOOL_VERSION } from '../version.js';

/** `sere hindcast --json` (README, "JSON"). */
export function hindcastJson(run: { file: string; seed: number; level: number; step: number; originsLeftOut: number;
  summary: readonly HindcastSummary[]; cases: readonly HindcastCase[]; errors?: string }): string {
  return JSON.stringify({
    format: 'sere-hindcast', format_version: 2, tool_version: TOOL_VERSION, file: run.file, seed: run.seed, level: run.level,
    step: run.step,
    // Only with an error table, so hindcasts without one keep their bytes: which scale was scored.
    ...(run.errors !== undefined ? { scale: 'recorded', errors: run.errors } : {}), origins_left_out: run.originsLeftOut, summary: run.summary.map((s) => ({ ...s, years: s.steps * run.step })), cases: run.cases,
  }, null, 2) + '\n';
}
