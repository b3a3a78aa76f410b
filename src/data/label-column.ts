import { ByteInterner } from './byte-interner.js';
import { compareCodePoints } from './code-points.js';
import { normaliseLabel } from './labels.js';

/**
 * The distinct labels of one column (site ids, states, groups), numbered in order of first
 * appearance. Each distinct raw value is decoded, trimmed (for the plain scanner's untrimmed
 * fields) and normalised to NFC once; two raw spellings of one label get one id.
 *
 * A raw value that is ASCII with nothing to trim is its own label, so while every value is like
 * that no two raw values can share a label and no Map from label to id is kept. Measured reason:
 * for 10⁶ site ids that Map cost 0.5–1.0 s of a 5 s fit of 10⁷ rows. The first value that needs
 * trimming or normalising builds the Map, and from then on every new value is looked up in it.
 */
export class LabelColumn {
  private readonly raw = new ByteInterner();
  private labelOfRaw = new Int32Array(1024);
  readonly labels: string[] = [];
  private ids: Map<string, number> | undefined;

  constructor(private readonly trim: boolean) {}

  /** The label id of bytes[start, end); `labels.length` grows by one when the label is new. */
  id(bytes: Buffer, start: number, end: number): number {
    const known = this.raw.size;
    const r = this.raw.intern(bytes, start, end);
    if (r < known) return this.labelOfRaw[r]!;
    let id: number;
    if (this.ids === undefined && this.isOwnLabel(bytes, start, end)) {
      id = this.labels.length;
      this.labels.push(bytes.toString('latin1', start, end));
    } else {
      this.ids ??= new Map(this.labels.map((label, n) => [label, n] as const));
      const text = bytes.toString('utf8', start, end);
      const label = normaliseLabel(this.trim ? text.trim() : text);
      id = this.ids.get(label) ?? this.labels.length;
      if (id === this.labels.length) {
        this.labels.push(label);
        this.ids.set(label, id);
      }
    }
    if (r === this.labelOfRaw.length) {
      const grown = new Int32Array(r * 2);
      grown.set(this.labelOfRaw);
      this.labelOfRaw = grown;
    }
    this.labelOfRaw[r] = id;
    return id;
  }

  /** Labels in code-point order, and each label id's place in that order. */
  ranks(): { sorted: string[]; rank: Int32Array } {
    const { labels } = this;
    const order = Array.from({ length: labels.length }, (_, n) => n).sort((a, b) => compareCodePoints(labels[a]!, labels[b]!));
    const rank = new Int32Array(labels.length);
    order.forEach((id, r) => { rank[id] = r; });
    return { sorted: order.map((id) => labels[id]!), rank };
  }

  /** ASCII (NFC already) and, when fields are trimmed, no whitespace at either end. */
  private isOwnLabel(bytes: Buffer, start: number, end: number): boolean {
    for (let i = start; i < end; i++) if (bytes[i]! >= 0x80) return false;
    if (!this.trim || end === start) return true;
    const space = (b: number): boolean => b === 0x20 || (b >= 0x09 && b <= 0x0d);
    return !space(bytes[start]!) && !space(bytes[end - 1]!);
  }
}
