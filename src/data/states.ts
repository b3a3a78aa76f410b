import { SereError, quote, type Place } from '../errors.js';
import { firstDifference, labelProblem, lookAlikeKey, MAX_STATES, normaliseLabel } from './labels.js';
import { settingName } from '../setting-name.js';
import { editDistance } from './label-typos.js';

/** The provisional id of a label that is not among the declared states (an error at the end). */
export const UNKNOWN = 255;

interface Label {
  /** Already NFC-normalised by the reader. */
  readonly label: string;
  readonly line: number;
  readonly column: number;
}

export interface ResolvedStates {
  readonly states: readonly string[];
  /** Provisional id (in order of first appearance, or the declared index) → index into `states`. */
  readonly index: Uint8Array;
}

/**
 * Fix the list of states as the rows stream past, one distinct label at a time. Declared states
 * keep the user's order and any other label is an error; otherwise states are the distinct labels,
 * sorted, and two that differ only by case or by look-alike characters are an error. Labels with
 * invisible characters are refused either way.
 *
 * `see` throws at the first bad label in file order (as it appears for the first time) and at the
 * 101st distinct label when inferring; `finish` throws the errors that need every label.
 */
export class StateLabels {
  private readonly distinct = new Map<string, number>();
  private readonly firstSeen: Label[] = [];
  private readonly declared?: readonly string[];
  private readonly declaredIndex?: Map<string, number>;
  private readonly declaredError?: unknown;
  private firstUnknown?: Label;

  constructor(private readonly file: string, declared: readonly string[] | undefined, private readonly minStates = 2,
    private readonly declaredAt: Place = FLAG_PLACE) {
    if (declared === undefined) return;
    try {
      this.declared = checkDeclared(declared, declaredAt);
      this.declaredIndex = new Map(this.declared.map((s, i) => [s, i] as const));
    } catch (err) {
      // An option error ranks after the labels' own problems (as when all labels were checked first).
      this.declaredError = err;
      this.declared = [];
    }
  }

  /** The provisional id of a normalised label seen for the first time at line and column. */
  see(label: string, line: number, column: number): number {
    const known = this.distinct.get(label);
    if (known !== undefined) return known;
    const problem = labelProblem(label, () => `state ${quote(label)}`);
    if (problem) throw new SereError(problem.code, problem.what, { file: this.file, line, column }, problem.hint);
    let id: number;
    if (this.declared) {
      id = this.declaredIndex?.get(label) ?? UNKNOWN;
      if (id === UNKNOWN && this.firstUnknown === undefined) this.firstUnknown = { label, line, column };
    } else {
      id = this.firstSeen.length;
      // Stop at once rather than build a 10,000-state chain: usually the wrong column is named.
      if (id >= MAX_STATES) {
        throw new SereError('TOO_MANY_STATES', `more than ${MAX_STATES} different states (this is state ${MAX_STATES + 1}: ${quote(label)})`,
          { file: this.file, line, column },
          `merge states into at most ${MAX_STATES} classes, or name the column that holds the states with ${settingName('--state-column', 'fit.columns.state')}`);
      }
      this.firstSeen.push({ label, line, column });
    }
    this.distinct.set(label, id);
    return id;
  }

  finish(): ResolvedStates {
    if (this.declaredError !== undefined) throw this.declaredError;
    if (this.declared) {
      const unknown = this.firstUnknown;
      if (unknown) {
        const states = this.declared;
        const near = states.find((s) => lookAlikeKey(s) === lookAlikeKey(unknown.label));
        // A declared state never surveyed and a slip away from the unknown label: the list is what to fix.
        const surveyed = new Set(this.distinct.values());
        const misspelt = near ? undefined : states.find((s, i) => !surveyed.has(i) && editDistance(s, unknown.label) <= 2);
        if (misspelt !== undefined) {
          const row = { file: this.file, line: unknown.line, column: unknown.column };
          throw new SereError('UNKNOWN_STATE', this.declaredAt.file
            ? `declared state ${quote(misspelt)} is never surveyed, and ${this.file}:${unknown.line}:${unknown.column} has ${quote(unknown.label)}, which is not declared`
            : `state ${quote(unknown.label)} is not declared, and the declared ${quote(misspelt)} is never surveyed`,
            this.declaredAt.file ? this.declaredAt : row,
            `spell it ${quote(unknown.label)} in ${this.declaredAt.path ?? '--states'}`);
        }
        const what = near
          ? `state ${quote(unknown.label)} differs from the declared state ${quote(near)} only by case, spacing or look-alike characters`
          : `unknown state ${quote(unknown.label)} (declared: ${states.map(quote).join(', ')})`;
        throw new SereError('UNKNOWN_STATE', what, { file: this.file, line: unknown.line, column: unknown.column },
          near ? `spell it ${quote(near)}` : `add ${quote(unknown.label)} to ${this.declaredAt.path ?? '--states'} or correct the row`);
      }
      return { states: this.declared, index: Uint8Array.from(this.declared, (_, i) => i) };
    }
    const states = inferStates(this.file, this.firstSeen, this.minStates);
    const at = new Map(states.map((s, i) => [s, i] as const));
    return { states, index: Uint8Array.from(this.firstSeen, (l) => at.get(l.label)!) };
  }
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

function inferStates(file: string, distinct: readonly Label[], minStates: number): readonly string[] {
  const byKey = new Map<string, Label>();
  for (const l of distinct) {
    const key = lookAlikeKey(l.label);
    const clash = byKey.get(key);
    if (clash) throw lookAlikeError(file, l, clash);
    byKey.set(key, l);
  }
  const states = distinct.map((l) => l.label).sort();
  if (states.length < minStates) {
    throw new SereError('TOO_FEW_STATES', `every site is in the same state (${quote(states[0] ?? '')})`, { file },
      'a chain needs surveys that record at least two different states');
  }
  return states;
}

/** Two labels that are probably one: a case clash when only case differs, else a look-alike. */
function lookAlikeError(file: string, l: Label, clash: Label): SereError {
  const hint = `correct the spelling, or declare both with ${settingName('--states', 'fit.states')} if they really are different states`;
  if (l.label.toLowerCase() === clash.label.toLowerCase()) {
    return new SereError('STATE_CASE_CLASH', `state ${quote(l.label)} differs from ${quote(clash.label)} (line ${clash.line}) only by case`,
      { file, line: l.line, column: l.column }, hint);
  }
  return new SereError('STATE_LOOK_ALIKE',
    `state ${quote(l.label)} looks like ${quote(clash.label)} (line ${clash.line}) but differs: ${firstDifference(l.label, clash.label)}`,
    { file, line: l.line, column: l.column }, hint);
}
