// Bundle the CLI. Measured reasons: start-up fell from 0.46 s to 0.22 s (`sere --version`),
// because Node no longer resolves and loads some 300 small CommonJS modules of the @stdlib
// packages one by one; and with splitting, the diagnostics of `sere check` (which bring mathjs) are
// a chunk loaded only by that command — in one file they cost every command ~0.1 s to compile.
// The bundle's code is exactly the compiled sources and pinned dependencies; `tsc` still
// type-checks everything first.
import { readdirSync, readFileSync, rmSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import { build } from 'esbuild';

// What code this is: a hash of every source file and the lock file, so a cached set of matrix
// draws (src/uncertainty/sample-cache.ts) made by other code is never read back as this code's.
function codeId() {
  const hash = createHash('sha256');
  const files = (dir) => readdirSync(dir, { withFileTypes: true }).flatMap((e) => e.isDirectory() ? files(join(dir, e.name)) : [join(dir, e.name)]);
  for (const file of [...files('src').sort(), 'package-lock.json']) hash.update(`${file}\0`).update(readFileSync(file)).update('\0');
  return hash.digest('hex');
}

// Chunks are named by content hash: clear the folder so stale ones do not pile up.
rmSync('dist/cli', { recursive: true, force: true });

await build({
  // Worker threads are entries of their own (dist/cli/engine-worker.mjs, xlsx-worker.mjs,
  // sampler-worker.mjs, and the watcher that starts them, worker-watcher.mjs), found beside the
  // bundle by src/worker-file.ts.
  entryPoints: { sere: 'src/bin/sere.ts', 'engine-worker': 'src/engine/engine-worker.ts', 'xlsx-worker': 'src/data/xlsx-worker.ts',
    'sampler-worker': 'src/uncertainty/sampler-worker.ts', 'worker-watcher': 'src/worker-watcher.ts' },
  outdir: 'dist/cli',
  outExtension: { '.js': '.mjs' },
  splitting: true,
  chunkNames: 'chunks/[name]-[hash]',
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  logLevel: 'warning',
  // DuckDB is a native addon (a prebuilt .node per platform): loaded from node_modules at run time,
  // and only by `sere count` on the DuckDB engine (a dynamic import in cli/count-command.ts).
  external: ['@duckdb/node-api', '@duckdb/node-bindings', '@duckdb/node-bindings-*'],
  define: { SERE_CODE_ID: JSON.stringify(codeId()) },
  // CommonJS dependencies call require(); give the ES module bundle one.
  banner: { js: "import { createRequire as sereCreateRequire } from 'node:module'; const require = sereCreateRequire(import.meta.url);" },
});
