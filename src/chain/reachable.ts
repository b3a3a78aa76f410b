/**
 * Which states can reach which in exactly t allowed steps, t = 0 … m: boolean powers of the
 * allowed-transition graph (every cell not declared impossible). `reach[t][i*k + j]` is 1 when
 * some path of t steps leads from i to j — what any matrix with these structural zeros and
 * positive allowed cells gives a positive (Pᵗ)ᵢⱼ.
 */
export function reachableInSteps(impossible: Uint8Array, k: number, m: number): Uint8Array[] {
  const reach: Uint8Array[] = [];
  const identity = new Uint8Array(k * k);
  for (let i = 0; i < k; i++) identity[i * k + i] = 1;
  reach.push(identity);
  for (let t = 1; t <= m; t++) {
    const before = reach[t - 1]!;
    const next = new Uint8Array(k * k);
    for (let i = 0; i < k; i++) {
      for (let l = 0; l < k; l++) {
        if (!before[i * k + l]) continue;
        for (let j = 0; j < k; j++) if (!impossible[l * k + j]) next[i * k + j] = 1;
      }
    }
    reach.push(next);
  }
  return reach;
}
