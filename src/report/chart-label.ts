/**
 * A state label as chart data. Vega keys internal objects by data values, so a state called
 * `constructor` or `__proto__` (a member of Object.prototype) breaks the facet and colour scales
 * ("Operator not defined") — measured with vega 6.2. Such labels get an invisible word joiner
 * (U+2060) appended: they print the same and are no longer prototype keys. Other labels pass as is.
 */
export function chartLabel(state: string): string {
  return state === '__proto__' || state in Object.prototype ? `${state}\u2060` : state;
}
