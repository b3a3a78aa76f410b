/**
 * The documented limits of sere (README, "Limits"): one owner for every bound a flag, a scenario
 * file or a workspace is checked against, so a flag and a file never disagree. Each bound keeps a
 * run from hanging or exhausting memory on a mistyped number; none is near what a survey needs.
 */
export const LIMITS = {
  /** Threads a run may be asked to use (`--threads`); more than the blocks of draws are not used. */
  threads: 256,
  /** Seeds are 1 … 2³² − 1. */
  seed: 4_294_967_295,
  /** States of a chain (a survey table, `--states`, a fit file): past this, a column is likely misnamed. */
  states: 100,
  /** Characters in a state name, site id or group. */
  labelLength: 200,
  /** Matrix draws per run. */
  draws: 1_000_000,
  /** Steps ahead a forecast, check or hindcast may look (1,000 yearly steps is ten centuries). */
  horizonSteps: 1_000,
  /** Plots simulated in a plot-count forecast. */
  plots: 1_000_000,
  /** Sites per future season in `sere effort`. */
  effortSites: 1_000_000,
  /** Future seasons in `sere effort`. */
  effortSeasons: 100,
  /** Simulated futures per cell in `sere effort`, and bootstrap replicates in `sere check`. */
  replicates: 100_000,
  /** Survey times a hindcast forecasts from (the most recent ones; each refits the chain). */
  hindcastOrigins: 200,
  /**
   * Memory a run may plan to hold, estimated before anything is allocated (engine/run-size.ts:
   * matrix draws, each draw's current mix, a chunk of years): past this the run is refused with
   * the estimate, not started.
   */
  memoryBytes: 4 * 1024 ** 3,
} as const;

/** "1.2 GB": an estimate for a message. */
export function formatBytes(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${(bytes / 1024 ** 3).toFixed(1)} GB`;
  if (bytes >= 1024 ** 2) return `${(bytes / 1024 ** 2).toFixed(0)} MB`;
  return `${Math.ceil(bytes / 1024)} kB`;
}
