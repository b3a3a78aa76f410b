/**
 * Communicating classes of a chain from the pattern of its positive entries: i and j communicate
 * when each can reach the other. A class is closed when no positive probability leaves it
 * (Kemeny & Snell 1960, ch. 2). Reachability by depth-first search: O(k²) per state, fine for the
 * tens of states a land-cover chain has.
 */
export interface ChainClasses {
  /** Each class as a sorted list of state indices, ordered by their smallest state. */
  readonly classes: readonly (readonly number[])[];
  readonly closed: readonly boolean[];
}

export function communicatingClasses(p: ArrayLike<number>, k: number, offset = 0): ChainClasses {
  const reach = Array.from({ length: k }, (_, start) => reachableFrom(p, k, offset, start));
  const classOf = new Array<number>(k).fill(-1);
  const classes: number[][] = [];
  for (let i = 0; i < k; i++) {
    if (classOf[i] !== -1) continue;
    const members: number[] = [];
    for (let j = 0; j < k; j++) if (reach[i]![j] && reach[j]![i]) members.push(j);
    for (const m of members) classOf[m] = classes.length;
    classes.push(members);
  }
  const closed = classes.map((members) =>
    members.every((i) => {
      for (let j = 0; j < k; j++) if (p[offset + i * k + j]! > 0 && classOf[j] !== classOf[i]) return false;
      return true;
    }),
  );
  return { classes, closed };
}

function reachableFrom(p: ArrayLike<number>, k: number, offset: number, start: number): boolean[] {
  const seen = new Array<boolean>(k).fill(false);
  seen[start] = true;
  const stack = [start];
  while (stack.length > 0) {
    const i = stack.pop()!;
    for (let j = 0; j < k; j++) {
      if (!seen[j] && p[offset + i * k + j]! > 0) {
        seen[j] = true;
        stack.push(j);
      }
    }
  }
  return seen;
}
