import { dirname, join, relative } from 'node:path';
import type { Fit } from '../fit/fit.js';
import { loadScenarios, type LoadOptions } from '../scenario/load-scenario.js';
import { loadWorkspace, workspaceAbove, WORKSPACE_FILE } from '../workspace/workspace.js';
import { fitWorkspace, sampledForSeason } from '../workspace/workspace-fit.js';
import type { Io } from './io.js';

type WorkspaceFit = { readonly fit: Fit; readonly seed?: number };

/**
 * `LoadOptions.workspace` for the commands that run scenarios: a scenario file that names no data,
 * inside a workspace folder (at or below the folder holding sere-workspace.yaml), is run on that
 * workspace's current surveys and fit block, as `sere season` runs it — so an option can be tried
 * between seasons without writing a record. The seed is the file's, else the workspace's (as a
 * season's); the posterior sampler, when the fit needs one, runs on the seed of the workspace's
 * first scenario file, as a season's does, so a seeded scenario's forecast is the one the next
 * record would hold for the same surveys. One fit per workspace per run; a notice says where it came from.
 */
export function workspaceScenarios(io: Io): NonNullable<LoadOptions['workspace']> {
  const fits = new Map<string, WorkspaceFit>();
  return (file) => {
    const root = workspaceAbove(dirname(file));
    if (root === undefined) return undefined;
    let known = fits.get(root);
    if (!known) {
      const ws = loadWorkspace(root);
      const { fit: unsampled } = fitWorkspace(ws);
      const first = ws.scenarios[0];
      const firstSeed = first === undefined ? undefined : loadScenarios(join(ws.root, first), { fit: unsampled })[0]!.seed ?? ws.seed;
      known = { fit: firstSeed === undefined ? unsampled : sampledForSeason(unsampled, firstSeed), ...(ws.seed !== undefined ? { seed: ws.seed } : {}) };
      fits.set(root, known);
      const shown = relative(process.cwd(), join(root, WORKSPACE_FILE)) || WORKSPACE_FILE;
      (io.notice ?? io.stderr)(`${file} names no data: fitted from the surveys of the workspace ${shown}, as sere season does (nothing is recorded)\n`);
    }
    return known;
  };
}
