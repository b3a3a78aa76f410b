import { communicatingClasses } from './classes.js';

export interface ChainStructure {
  /** Communicating classes, each a sorted list of states. */
  readonly classes: readonly (readonly number[])[];
  readonly closed: readonly boolean[];
  /** Period of each class: the gcd of its cycle lengths (1 = aperiodic). */
  readonly periods: readonly number[];
  /** States in classes that are not closed: sites leave them for good eventually. */
  readonly transient: readonly number[];
  /** States that, once entered, are never left (pᵢᵢ = 1). */
  readonly absorbing: readonly number[];
  /** One class: every state can reach every other. */
  readonly irreducible: boolean;
}

/**
 * Classify a chain (Kemeny & Snell 1960, ch. 2): communicating classes, closed and transient
 * states, absorbing states, and the period of each class. The period is found by a breadth-first
 * search inside the class: it is the gcd of level(u) + 1 − level(v) over the class's edges u → v.
 */
export function chainStructure(p: ArrayLike<number>, k: number, offset = 0): ChainStructure {
  const { classes, closed } = communicatingClasses(p, k, offset);
  const periods = classes.map((members) => classPeriod(p, k, offset, members));
  const transient = classes.flatMap((members, c) => (closed[c] ? [] : members));
  const absorbing = classes.flatMap((members) => (members.length === 1 && p[offset + members[0]! * (k + 1)] === 1 ? members : []));
  return { classes, closed, periods, transient, absorbing, irreducible: classes.length === 1 };
}

function classPeriod(p: ArrayLike<number>, k: number, offset: number, members: readonly number[]): number {
  const inClass = new Set(members);
  const level = new Map<number, number>([[members[0]!, 0]]);
  const queue = [members[0]!];
  let g = 0;
  while (queue.length > 0) {
    const u = queue.shift()!;
    for (const v of members) {
      if (!(p[offset + u * k + v]! > 0) || !inClass.has(v)) continue;
      const lv = level.get(v);
      if (lv === undefined) {
        level.set(v, level.get(u)! + 1);
        queue.push(v);
      } else {
        g = gcd(g, Math.abs(level.get(u)! + 1 - lv));
      }
    }
  }
  // A single state without a self-loop has no cycle inside its class: period undefined, shown as 0.
  return g;
}

/** Greatest common divisor of two whole numbers (Euclid). */
export function gcd(a: number, b: number): number {
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}
