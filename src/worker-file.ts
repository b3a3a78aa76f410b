import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

/**
 * Where a worker thread's code is, seen from the module at `from` (its import.meta.url): beside
 * the bundle (dist/cli/NAME.mjs, from the entry or from one of its chunks/), beside the module
 * when compiled (dist/src/FOLDER/NAME.js), or — when the module runs from its TypeScript source,
 * as under the test runner — the compiled copy. Each worker is an entry of its own in
 * scripts/bundle.mjs. `folder` '' is src/ itself (the watcher of watched-worker.ts).
 */
export function workerFile(name: string, folder: string, from: string): URL {
  const source = folder === '' ? `../dist/src/${name}.js` : `../../dist/src/${folder}/${name}.js`;
  const candidates = [`./${name}.mjs`, `../${name}.mjs`, `./${name}.js`, source];
  for (const c of candidates) {
    const url = new URL(c, from);
    if (existsSync(fileURLToPath(url))) return url;
  }
  throw new Error(`the worker file ${name} is missing (looked for ${candidates.join(', ')} from ${from}); run npm run build`);
}
