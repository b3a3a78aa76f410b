import { existsSync, readdirSync, readFileSync, rmdirSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseDocument } from 'yaml';
import { SereError } from '../errors.js';
import { writeFolderAtomic } from './record-folder.js';
import { WORKSPACE_FILE } from './workspace.js';

/**
 * A file installed with sere (the demo, the schema), found from wherever this code runs: the
 * sources and the compiled files sit two folders below the root, the bundle's chunks three.
 */
export function installed(path: string): string {
  for (const up of ['../../', '../../../']) {
    const full = fileURLToPath(new URL(up + path, import.meta.url));
    if (existsSync(full)) return full;
  }
  throw new Error(`internal: ${path} is not installed next to sere`);
}

const DEMO_STATES = ['mudflat', 'pioneer', 'low-marsh', 'high-marsh', 'rank-grass'];

/** The two demo workspaces: one pooled chain (surveys.csv), or three zones partially pooled (zoned-surveys.csv). */
const DEMOS = {
  pooled: {
    surveys: ['surveys.csv', 'surveys/brenhollow-2015-2024.csv'],
    pooling: [],
    scenarios: ['no-action.yaml', 'storm-surges.yaml', 'options.yaml'],
  },
  zoned: {
    surveys: ['zoned-surveys.csv', 'surveys/brenhollow-zones-2015-2024.csv'],
    pooling: ['  pooling: partial            # each zone its own chain, pulled toward shared rows'],
    scenarios: ['zoned.yaml'],
  },
} as const;
export type DemoKind = keyof typeof DEMOS;

/**
 * A new workspace holding the invented Brenhollow demo, ready for `sere season`: the survey table,
 * the demo scenarios (their own `data` and `fit` removed — the workspace supplies both), the
 * scenario JSON Schema for editors, and the workspace file. The folder must not exist or be empty.
 * `zoned`: the saltings' three zones, fitted with partial pooling and forecast stratified by zone.
 */
export function initWorkspace(dir: string, kind: DemoKind = 'pooled'): string[] {
  refuseUsedFolder(dir);
  const demo = dirname(installed('scenarios/brenhollow/surveys.csv'));
  const { surveys: [source, copy], pooling, scenarios } = DEMOS[kind];
  const files = new Map<string, string | Buffer>();
  files.set(WORKSPACE_FILE, [
    `# A sere workspace (invented demo: Brenhollow Saltings${kind === 'zoned' ? ', by zone' : ''}). Run \`sere season\` here after each season's surveys.`,
    'name: Brenhollow Saltings',
    'surveys:                      # add next season\'s table to this list',
    `  - ${copy}`,
    'fit:',
    `  states: [${DEMO_STATES.join(', ')}]`,
    '  impossible: [mudflat>high-marsh, rank-grass>mudflat]',
    '  columns: { group: zone }',
    ...pooling,
    'scenarios:',
    ...scenarios.map((name) => `  - scenarios/${name}`),
    'records: records',
    '',
  ].join('\n'));
  files.set(copy, readFileSync(join(demo, source), 'utf8'));
  for (const name of scenarios) {
    const doc = parseDocument(readFileSync(join(demo, name), 'utf8'));
    doc.delete('data');
    doc.delete('fit');
    const text = doc.toString().replace(/^# yaml-language-server: .*$/m, '# yaml-language-server: $schema=../scenario.schema.json');
    files.set(`scenarios/${name}`, text);
  }
  files.set('scenario.schema.json', readFileSync(installed('schema/scenario.schema.json'), 'utf8'));
  writeWorkspace(dir, files);
  return [...files.keys()];
}

/** A workspace goes into a new or empty folder only. */
export function refuseUsedFolder(dir: string): void {
  if (existsSync(dir) && !statSync(dir).isDirectory()) {
    throw new SereError('FILE_EXISTS', 'is a file, not a folder; nothing was written', { file: dir }, 'choose a new or empty folder');
  }
  if (existsSync(dir) && readdirSync(dir).length > 0) {
    throw new SereError('FILE_EXISTS', 'is not empty; nothing was written', { file: dir }, 'choose a new or empty folder');
  }
}

/** Write a new workspace's files all at once (record-folder.ts), into a folder checked empty. */
export function writeWorkspace(dir: string, files: ReadonlyMap<string, string | Buffer>): void {
  if (existsSync(dir)) rmdirSync(dir); // empty, checked by refuseUsedFolder: the atomic write creates it afresh
  writeFolderAtomic(dir, files);
}
