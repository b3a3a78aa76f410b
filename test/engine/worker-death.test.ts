import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeWorkbooks } from '../../scripts/make-workbooks.js';
import { sere } from '../cli/binary.js';

/**
 * A worker thread that dies outright must not leave the caller waiting for ever in Atomics.wait
 * (watched-worker.ts). SERE_WORKER_HEAP_MB caps each worker's heap (a test hook), so the worker
 * really runs out of memory; the run must end promptly with WORKER_DIED in one line, exit 1, and
 * write none of the files it was asked for. Each run has a 60 s test timeout and spawnSync a 30 s
 * kill: a hang fails the test instead of stalling the suite.
 */
const dir = mkdtempSync(join(tmpdir(), 'sere-worker-death-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const oneLine = (stderr: string): string[] => stderr.trimEnd().split('\n');

describe('a worker thread that runs out of memory', () => {
  it('ends a two-thread forecast with WORKER_DIED, exit 1, one line, and no --csv or --chart written', () => {
    const csv = join(dir, 'out.csv');
    const chart = join(dir, 'out.svg');
    const r = sere(['forecast', 'scenarios/brenhollow/no-action.yaml', '--threads', '2', '--draws', '4000', '--variation', 'none',
      '--csv', csv, '--chart', chart, '--debug'], { SERE_WORKER_HEAP_MB: '2' }, 30_000);
    expect(r.code, r.stderr).toBe(1);
    expect(oneLine(r.stderr)).toHaveLength(1);
    expect(r.stderr).toContain('[WORKER_DIED]');
    expect(existsSync(csv)).toBe(false);
    expect(existsSync(chart)).toBe(false);
  });

  it('runs the same forecast on one thread (no worker) under the same cap, and with the default heap on two', () => {
    expect(sere(['forecast', 'scenarios/brenhollow/no-action.yaml', '--threads', '1', '--draws', '4000', '--variation', 'none'],
      { SERE_WORKER_HEAP_MB: '2' }, 30_000).code).toBe(0);
    expect(sere(['forecast', 'scenarios/brenhollow/no-action.yaml', '--threads', '2', '--draws', '4000', '--variation', 'none'], {}, 30_000).code).toBe(0);
  });

  it('ends reading a workbook (the xlsx worker) with WORKER_DIED, exit 1, one line', async () => {
    const { surveys } = await writeWorkbooks(dir);
    const r = sere(['fit', surveys, '--states', 'grass,heath,scrub,woodland', '--site-column', 'plot', '--time-column', 'year', '--state-column', 'cover', '--debug'],
      { SERE_WORKER_HEAP_MB: '2' }, 30_000);
    expect(r.code, r.stderr).toBe(1);
    expect(oneLine(r.stderr)).toHaveLength(1);
    expect(r.stderr).toContain('[WORKER_DIED]');
  });
});
