import type { HindcastCase, HindcastSummary } from '../evaluation/hindcast.js';
import { TOOL_VERSION } from '../version.js';

/** `sere hindcast --json` (README, "JSON"). */
export function hindcastJson(run: { file: string; seed: number; level: number; step: number; originsLeftOut: number;
  summary: readonly HindcastSummary[]; cases: readonly HindcastCase[] }): string {
  return JSON.stringify({
    format: 'sere-hindcast', format_version: 2, tool_version: TOOL_VERSION, file: run.file, seed: run.seed, level: run.level,
    step: run.step, origins_left_out: run.originsLeftOut, summary: run.summary.map((s) => ({ ...s, years: s.steps * run.step })), cases: run.cases,
  }, null, 2) + '\n';
}
