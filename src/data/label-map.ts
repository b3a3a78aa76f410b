import { isMap, isScalar, LineCounter, parseDocument } from 'yaml';
import { SereError, quote, type Place } from '../errors.js';
import { labelProblem, normaliseLabel } from './labels.js';
import { readTextFile } from './read-text-file.js';

/** The value that drops a label's surveys instead of mapping them to a state. */
export const SKIP_LABEL = 'skip';

/**
 * A label map: how labels as recorded (spelling variants, a field team's own names, class codes)
 * become the chain's states. Keys and states are compared as survey labels are — trimmed, in NFC.
 */
export interface LabelMap {
  readonly file: string;
  readonly sha256: string;
  /** Recorded label → state, or null for a label whose surveys are skipped. */
  readonly targets: ReadonlyMap<string, string | null>;
  /** The states labels are mapped to: a label already spelled as one of them passes unchanged. */
  readonly states: ReadonlySet<string>;
  /** The line of each key, for messages. */
  readonly lines: ReadonlyMap<string, number>;
}

const WHAT = 'label map';
const FORMAT_HINT = 'write one "recorded label: state" pair per line, e.g. "Bracken: bracken" or "41: woodland" (or "41: skip")';

/**
 * Read a label map: a YAML map of recorded label → state, e.g.
 *
 *     "Bracken": bracken
 *     41: woodland
 *     99: skip
 *
 * Read with YAML's failsafe schema, so every key and value is the text as written: `041` stays
 * `041` (a class code, not the number 41) and `yes` stays `yes`. Two keys that are one label after
 * trimming and NFC (or a key written twice) are an error naming both lines: which state was meant?
 */
export function readLabelMap(file: string): LabelMap {
  const { text, sha256 } = readTextFile(file, WHAT);
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, schema: 'failsafe', uniqueKeys: false });
  const place = (offset: number | undefined): Place => {
    if (offset === undefined) return { file };
    const { line, col } = lineCounter.linePos(offset);
    return { file, line, column: col };
  };
  const syntax = doc.errors[0];
  if (syntax) {
    const pos = syntax.linePos?.[0];
    throw new SereError('BAD_YAML', `not valid YAML: ${syntax.message.split('\n')[0]!.replace(/ at line \d+, column \d+:?$/, '')}`,
      { file, line: pos?.line, column: pos?.col }, "fix the label map's syntax at that spot");
  }
  const contents = doc.contents;
  if (!isMap(contents) || contents.items.length === 0) {
    throw new SereError('BAD_LABEL_MAP', 'a label map is a map of recorded labels to states', place(contents?.range?.[0]), FORMAT_HINT);
  }
  const targets = new Map<string, string | null>();
  const lines = new Map<string, number>();
  const states = new Set<string>();
  for (const pair of contents.items) {
    const keyNode = pair.key;
    const valueNode = pair.value;
    if (!isScalar(keyNode) || !isScalar(valueNode)) {
      const node = (isScalar(keyNode) ? valueNode : keyNode) as { range?: [number, number, number] } | null;
      throw new SereError('BAD_LABEL_MAP', 'each entry maps one recorded label to one state', place(node?.range?.[0]), FORMAT_HINT);
    }
    const keyPlace = place(keyNode.range?.[0]);
    const key = normaliseLabel(String(keyNode.value).trim());
    const value = normaliseLabel(String(valueNode.value).trim());
    if (key === '') throw new SereError('BAD_LABEL_MAP', 'an empty recorded label', keyPlace, 'remove the entry; empty cells are never surveys');
    if (value === '') {
      throw new SereError('BAD_LABEL_MAP', `label ${quote(key)} is mapped to nothing`, keyPlace, `map it to a state, or to ${SKIP_LABEL} to leave its surveys out`);
    }
    const firstLine = lines.get(key);
    if (firstLine !== undefined) {
      const same = String(keyNode.value) === key ? 'is given twice' : 'is the same label as another key after trimming and Unicode normalisation (NFC)';
      throw new SereError('DUPLICATE_KEY', `label ${quote(key)} ${same} (first on line ${firstLine})`, keyPlace,
        'keep one entry for the label: one recorded label maps to one state');
    }
    lines.set(key, keyPlace.line ?? 0);
    if (value === SKIP_LABEL) {
      targets.set(key, null);
      continue;
    }
    const problem = labelProblem(value, `state ${quote(value)}`);
    if (problem) throw new SereError(problem.code, problem.what, place(valueNode.range?.[0]), problem.hint);
    targets.set(key, value);
    states.add(value);
  }
  return { file, sha256, targets, states, lines };
}
