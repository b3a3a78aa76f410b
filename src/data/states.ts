import { SereError, quote, type Place } from '../errors.js';
import { firstDifference, labelProblem, lookAlikeKey, MAX_STATES, normaliseLabel } from './labels.js';

export interface StateResolver {
  readonly states: readonly string[];
  indexOf(label: string): number;
}

interface Label {
  /** Already NFC-normalised by the reader. */
  readonly label: string;
  readonly line: number;
  readonly column: number;
}

/**
 * Fix the list of states. Declared states keep the user's order and any other label is an error;
 * otherwise states are the distinct labels, sorted, and two that differ only by case or by
 * look-alike characters are an error. Labels with invisible characters are refused either way.
 */
export function resolveStates(file: string, labels: readonly Label[], declared?: readonly string[], minStates = 2,
  declaredAt: Place = FLAG_PLACE): StateResolver {
  const distinct = distinctLabels(file, labels, declared === undefined);
  const states = declared ? checkDeclared(declared, declaredAt) : inferStates(file, distinct, minStates);
  const where = declaredAt.path ?? '--states';
  const index = new Map(states.map((s, i) => [s, i] as const));
  if (declared) {
    for (const { label, line, column } of distinct.values()) {
      if (index.has(label)) continue;
      const near = states.find((s) => lookAlikeKey(s) === lookAlikeKey(label));
      const what = near
        ? `state ${quote(label)} differs from the declared state ${quote(near)} only by case, spacing or look-alike characters`
        : `unknown state ${quote(label)} (declared: ${states.map(quote).join(', ')})`;
      throw new SereError('UNKNOWN_STATE', what, { file, line, column },
        near ? `spell it ${quote(near)}` : `add ${quote(label)} to ${where} or correct the row`);
    }
  }
  return {
    states,
    indexOf(label: string): number {
      const i = index.get(label);
      if (i === undefined) throw new Error(`internal: state ${quote(label)} was not resolved`);
      return i;
    },
  };
}

/** Each distinct label with where it first appears; each checked once, in file order. */
function distinctLabels(file: string, labels: readonly Label[], inferring: boolean): Map<string, Label> {
  const firstSeen = new Map<string, Label>();
  for (const l of labels) {
    if (firstSeen.has(l.label)) continue;
    const problem = labelProblem(l.label, `state ${quote(l.label)}`);
    if (problem) throw new SereError(problem.code, problem.what, { file, line: l.line, column: l.column }, problem.hint);
    firstSeen.set(l.label, l);
    // Stop at once rather than build a 10,000-state chain: usually the wrong column is named.
    if (inferring && firstSeen.size > MAX_STATES) {
      throw new SereError('TOO_MANY_STATES', `more than ${MAX_STATES} different states (this is state ${MAX_STATES + 1}: ${quote(l.label)})`,
        { file, line: l.line, column: l.column },
        `merge states into at most ${MAX_STATES} classes, or name the column that holds the states with --state-column`);
    }
  }
  return firstSeen;
}

/** Where declared states come from when the caller does not say: the command-line flag. */
const FLAG_PLACE: Place = { path: '--states' };

function checkDeclared(declared: readonly string[], place: Place): readonly string[] {
  const states = declared.map((s) => normaliseLabel(s.trim()));
  const seen = new Set<string>();
  for (const s of states) {
    if (s === '') {
      throw new SereError('BAD_OPTION', `an empty state name in ${place.path ?? '--states'}`, place,
        'list state names separated by commas, e.g. --states bare,grass,shrub');
    }
    const problem = labelProblem(s, `declared state ${quote(s)}`);
    if (problem) throw new SereError(problem.code, problem.what, place, problem.hint);
    if (seen.has(s)) {
      throw new SereError('BAD_OPTION', `state ${quote(s)} is listed twice`, place, 'list each state once');
    }
    seen.add(s);
  }
  if (states.length < 2) {
    throw new SereError('TOO_FEW_STATES', 'a chain needs at least two states', place,
      'list every state the sites can be in');
  }
  if (states.length > MAX_STATES) {
    throw new SereError('TOO_MANY_STATES', `${states.length} states declared (at most ${MAX_STATES})`, place,
      `merge states into at most ${MAX_STATES} classes`);
  }
  return states;
}

function inferStates(file: string, distinct: ReadonlyMap<string, Label>, minStates: number): readonly string[] {
  const byKey = new Map<string, Label>();
  for (const l of distinct.values()) {
    const key = lookAlikeKey(l.label);
    const clash = byKey.get(key);
    if (clash) throw lookAlikeError(file, l, clash);
    byKey.set(key, l);
  }
  const states = [...distinct.keys()].sort();
  if (states.length < minStates) {
    throw new SereError('TOO_FEW_STATES', `every site is in the same state (${quote(states[0] ?? '')})`, { file },
      'a chain needs surveys that record at least two different states');
  }
  return states;
}

/** Two labels that are probably one: a case clash when only case differs, else a look-alike. */
function lookAlikeError(file: string, l: Label, clash: Label): SereError {
  const hint = 'correct the spelling, or declare both with --states if they really are different states';
  if (l.label.toLowerCase() === clash.label.toLowerCase()) {
    return new SereError('STATE_CASE_CLASH', `state ${quote(l.label)} differs from ${quote(clash.label)} (line ${clash.line}) only by case`,
      { file, line: l.line, column: l.column }, hint);
  }
  return new SereError('STATE_LOOK_ALIKE',
    `state ${quote(l.label)} looks like ${quote(clash.label)} (line ${clash.line}) but differs: ${firstDifference(l.label, clash.label)}`,
    { file, line: l.line, column: l.column }, hint);
}
