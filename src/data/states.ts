import { SereError } from '../errors.js';

export interface StateResolver {
  readonly states: readonly string[];
  indexOf(label: string): number;
}

interface Label {
  readonly label: string;
  readonly line: number;
  readonly column: number;
}

/** Labels that differ only by case or surrounding spaces are reported, never silently merged. */
const foldLabel = (label: string): string => label.trim().toLowerCase();

/**
 * Fix the list of states. Declared states keep the user's order and any other label is an error;
 * otherwise states are the distinct labels, sorted, and two that differ only by case are an error.
 */
export function resolveStates(file: string, labels: readonly Label[], declared?: readonly string[], minStates = 2): StateResolver {
  const states = declared ? checkDeclared(declared) : inferStates(file, labels, minStates);
  const index = new Map(states.map((s, i) => [s, i] as const));
  if (declared) {
    for (const { label, line, column } of labels) {
      if (index.has(label)) continue;
      const near = states.find((s) => foldLabel(s) === foldLabel(label));
      const what = near
        ? `state '${label}' differs from the declared state '${near}' only by case or spacing`
        : `unknown state '${label}' (declared: ${states.join(', ')})`;
      throw new SereError('UNKNOWN_STATE', what, { file, line, column },
        near ? `spell it '${near}'` : `add '${label}' to --states or correct the row`);
    }
  }
  return {
    states,
    indexOf(label: string): number {
      const i = index.get(label);
      if (i === undefined) throw new Error(`internal: state '${label}' was not resolved`);
      return i;
    },
  };
}

function checkDeclared(declared: readonly string[]): readonly string[] {
  const states = declared.map((s) => s.trim());
  const seen = new Map<string, string>();
  for (const s of states) {
    if (s === '') {
      throw new SereError('BAD_OPTION', 'an empty state name in --states', { path: '--states' },
        'list state names separated by commas, e.g. --states bare,grass,shrub');
    }
    const clash = seen.get(foldLabel(s));
    if (clash === s) {
      throw new SereError('BAD_OPTION', `state '${s}' is listed twice`, { path: '--states' }, 'list each state once');
    }
    seen.set(foldLabel(s), s);
  }
  if (states.length < 2) {
    throw new SereError('TOO_FEW_STATES', 'a chain needs at least two states', { path: '--states' },
      'list every state the sites can be in');
  }
  return states;
}

function inferStates(file: string, labels: readonly Label[], minStates: number): readonly string[] {
  const firstSeen = new Map<string, Label>();
  const byFold = new Map<string, Label>();
  for (const l of labels) {
    if (firstSeen.has(l.label)) continue;
    firstSeen.set(l.label, l);
    const clash = byFold.get(foldLabel(l.label));
    if (clash) {
      throw new SereError('STATE_CASE_CLASH',
        `state '${l.label}' differs from '${clash.label}' (line ${clash.line}) only by case`,
        { file, line: l.line, column: l.column },
        'correct the spelling, or declare both with --states if they really are different states');
    }
    byFold.set(foldLabel(l.label), l);
  }
  const states = [...firstSeen.keys()].sort();
  if (states.length < minStates) {
    throw new SereError('TOO_FEW_STATES', `every site is in the same state ('${states[0]}')`, { file },
      'a chain needs surveys that record at least two different states');
  }
  return states;
}
