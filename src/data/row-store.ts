/**
 * Survey rows as they are read, in file order, growing by doubling (or to an estimate, so a large
 * file is not copied a dozen times). Owned by one reader: `release` hands the columns over.
 */
export class RowStore {
  count = 0;
  site = new Int32Array(1024);
  time = new Float64Array(1024);
  state = new Uint8Array(1024);
  line = new Float64Array(1024);
  group: Int32Array | undefined;
  observer: Int32Array | undefined;

  constructor(withGroups: boolean, withObservers = false) {
    if (withGroups) this.group = new Int32Array(1024);
    if (withObservers) this.observer = new Int32Array(1024);
  }

  push(site: number, time: number, state: number, line: number, group: number, observer = 0): void {
    const n = this.count;
    if (n === this.site.length) this.reserve(n * 2);
    this.site[n] = site;
    this.time[n] = time;
    this.state[n] = state;
    this.line[n] = line;
    if (this.group) this.group[n] = group;
    if (this.observer) this.observer[n] = observer;
    this.count = n + 1;
  }

  /** Room for `rows` rows in all. */
  reserve(rows: number): void {
    if (rows <= this.site.length) return;
    const grow = <T extends Int32Array | Float64Array | Uint8Array>(a: T, make: (n: number) => T): T => {
      const b = make(rows);
      b.set(a.subarray(0, this.count) as never);
      return b;
    };
    this.site = grow(this.site, (n) => new Int32Array(n));
    this.time = grow(this.time, (n) => new Float64Array(n));
    this.state = grow(this.state, (n) => new Uint8Array(n));
    this.line = grow(this.line, (n) => new Float64Array(n));
    if (this.group) this.group = grow(this.group, (n) => new Int32Array(n));
    if (this.observer) this.observer = grow(this.observer, (n) => new Int32Array(n));
  }

  /**
   * Hand the columns over, trimmed to the count, one at a time: each `take` drops the store's
   * reference, so a column can be freed as soon as its user is done with it.
   */
  release(): { take<K extends 'site' | 'time' | 'state' | 'line' | 'group' | 'observer'>(column: K): RowStore[K] } {
    const n = this.count;
    const columns: Partial<Pick<RowStore, 'site' | 'time' | 'state' | 'line' | 'group' | 'observer'>> = {
      site: this.site.subarray(0, n), time: this.time.subarray(0, n), state: this.state.subarray(0, n), line: this.line.subarray(0, n),
      ...(this.group ? { group: this.group.subarray(0, n) } : {}),
      ...(this.observer ? { observer: this.observer.subarray(0, n) } : {}),
    };
    this.count = 0;
    this.site = new Int32Array(0); this.time = new Float64Array(0); this.state = new Uint8Array(0); this.line = new Float64Array(0);
    if (this.group) this.group = new Int32Array(0);
    if (this.observer) this.observer = new Int32Array(0);
    return {
      take(column) {
        const out = columns[column];
        delete columns[column];
        return out as never;
      },
    };
  }
}
