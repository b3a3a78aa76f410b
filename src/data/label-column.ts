import { ByteInterner } from './byte-interner.js';
import { normaliseLabel } from './labels.js';

/**
 * The distinct labels of one column (site ids, states, groups), numbered in order of first
 * appearance. Each distinct raw value is decoded, trimmed (for the plain scanner's untrimmed
 * fields) and normalised to NFC once; two raw spellings of one label get one id.
 */
export class LabelColumn {
  private readonly raw = new ByteInterner();
  private labelOfRaw = new Int32Array(1024);
  readonly labels: string[] = [];
  private readonly ids = new Map<string, number>();

  constructor(private readonly trim: boolean) {}

  /** The label id of bytes[start, end); `labels.length` grows by one when the label is new. */
  id(bytes: Buffer, start: number, end: number): number {
    const known = this.raw.size;
    const r = this.raw.intern(bytes, start, end);
    if (r < known) return this.labelOfRaw[r]!;
    const text = bytes.toString('utf8', start, end);
    const label = normaliseLabel(this.trim ? text.trim() : text);
    let id = this.ids.get(label);
    if (id === undefined) {
      id = this.labels.length;
      this.labels.push(label);
      this.ids.set(label, id);
    }
    if (r === this.labelOfRaw.length) {
      const grown = new Int32Array(r * 2);
      grown.set(this.labelOfRaw);
      this.labelOfRaw = grown;
    }
    this.labelOfRaw[r] = id;
    return id;
  }

  idOf(label: string): number | undefined {
    return this.ids.get(label);
  }
}
