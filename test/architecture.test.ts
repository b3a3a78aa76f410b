import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * The data flow runs one way (DESIGN.md): each stage may import only the stages upstream of it.
 * Kept as a test, not prose, so the layering cannot drift.
 */
const allowed: Record<string, string[]> = {
  data: [],
  chain: ['data'],
  fit: ['data', 'chain'],
  // Counting with SQL engines: the portable query and embedded DuckDB, from files to a counts table.
  sql: ['data', 'chain'],
  uncertainty: ['chain', 'fit'],
  scenario: ['data', 'chain', 'fit', 'uncertainty'],
  engine: ['chain', 'fit', 'uncertainty', 'scenario'],
  diagnostics: ['chain', 'fit', 'uncertainty', 'engine'],
  evaluation: ['data', 'chain', 'fit', 'uncertainty', 'scenario', 'engine'],
  workspace: ['data', 'chain', 'fit', 'uncertainty', 'scenario', 'engine', 'evaluation'],
  report: ['chain', 'fit', 'engine', 'scenario', 'diagnostics', 'evaluation', 'workspace'],
  cli: ['data', 'chain', 'fit', 'uncertainty', 'scenario', 'engine', 'diagnostics', 'evaluation', 'workspace', 'report', 'sql'],
};

function sources(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? sources(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : []);
}

describe('layering', () => {
  for (const [stage, upstream] of Object.entries(allowed)) {
    it(`src/${stage} imports only ${upstream.length ? upstream.join(', ') : 'no other stage'}`, () => {
      const offenders: string[] = [];
      for (const file of sources(join('src', stage))) {
        const text = readFileSync(file, 'utf8');
        // Static imports, `import type`, re-exports and dynamic import('…') alike.
        for (const [, target] of text.matchAll(/(?:from\s+|import\s*\(\s*)'\.\.\/([a-z-]+)\//g)) {
          if (target !== stage && target !== undefined && target in allowed && !upstream.includes(target)) offenders.push(`${file} → ${target}`);
        }
      }
      expect(offenders).toEqual([]);
    });
  }

  it('has no loops: the allowed stages form a one-way order', () => {
    // Depth-first search for a cycle in the allowed graph (a stage reaching itself).
    const state = new Map<string, 'open' | 'done'>();
    const loops: string[] = [];
    const visit = (stage: string, path: string[]): void => {
      if (state.get(stage) === 'done') return;
      if (state.get(stage) === 'open') { loops.push([...path, stage].join(' → ')); return; }
      state.set(stage, 'open');
      for (const up of allowed[stage] ?? []) visit(up, [...path, stage]);
      state.set(stage, 'done');
    };
    for (const stage of Object.keys(allowed)) visit(stage, []);
    expect(loops).toEqual([]);
  });
});
