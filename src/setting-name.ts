/**
 * A fit setting as a hint names it: its command-line flag and its scenario key, since the same
 * reader serves `sere fit --state-column …` and a scenario's `fit: { columns: { state: … } }`, and a
 * hint that names only the flag leaves a scenario's author looking for it (found in a newcomer's trial).
 */
export function settingName(flag: string, scenarioKey: string): string {
  return `${flag} (${scenarioKey} in a scenario)`;
}
