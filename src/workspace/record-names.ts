/** A scenario file's name in a record: its workspace path with folders joined by '-', extension dropped. */
export function stemOf(path: string): string {
  return path.replace(/\.(ya?ml|csv|json)$/i, '').split('/').join('-');
}

/**
 * The first pair of paths that would share a name in a record (`scenarios/a.yaml` and
 * `scenarios-a.yml`), compared without case since records may be copied to a file system that
 * ignores it; undefined when every name is distinct. The workspace refuses such pairs, which keeps
 * record names one-to-one with scenario files.
 */
export function clashingStems(paths: readonly string[]): [number, number] | undefined {
  const seen = new Map<string, number>();
  for (let n = 0; n < paths.length; n++) {
    const key = stemOf(paths[n]!).toLowerCase();
    const before = seen.get(key);
    if (before !== undefined) return [before, n];
    seen.set(key, n);
  }
  return undefined;
}
