/** Mean length of a Gregorian year in days: the period of the survey season. */
const YEAR_DAYS = 365.2425;

/** How survey dates were rounded to seasons (yearly), for the report. */
export interface SeasonRounding {
  /** The season's centre as month and day, e.g. `08-14`: the circular mean of the survey dates' day of the year. */
  readonly centre: string;
  /** The largest distance, in days, from a survey date to its season's centre, and the line of that survey. */
  readonly largestShiftDays: number;
  readonly largestShiftLine: number;
  /** Surveys whose season is not their calendar year (a January survey of a late-summer season, say). */
  readonly otherYear: number;
  readonly dates: number;
}

/**
 * Survey dates (days since 1970-01-01, in `time`) to season years, in place: surveys are made once
 * a season, so each date goes to the nearest occurrence of the season's centre, and the season is
 * named by the year that centre falls in. The centre is the circular mean of the dates' positions
 * in the year (Fisher 1993, *Statistical Analysis of Circular Data*, §2.2), so a season that spans
 * the new year (December–January surveys) gets a centre near the turn of the year, not in July as an
 * ordinary mean of day numbers would. Two surveys of one site that round to one season are then a
 * repeated survey, checked as any other.
 */
export function roundToSeasons(time: Float64Array, lines: Float64Array, count: number): SeasonRounding {
  let sx = 0;
  let sy = 0;
  for (let n = 0; n < count; n++) {
    const angle = 2 * Math.PI * (time[n]! / YEAR_DAYS);
    sx += Math.cos(angle);
    sy += Math.sin(angle);
  }
  // With dates spread evenly over the year there is no centre; the phase of the (near-zero) mean still gives one.
  const phase = ((Math.atan2(sy, sx) / (2 * Math.PI)) % 1 + 1) % 1;
  let largest = 0;
  let largestLine = 0;
  let otherYear = 0;
  for (let n = 0; n < count; n++) {
    const years = time[n]! / YEAR_DAYS;
    const season = Math.round(years - phase);
    const shift = Math.abs(years - phase - season) * YEAR_DAYS;
    const calendarYear = new Date(time[n]! * 86_400_000).getUTCFullYear();
    const centreDay = Math.round((season + phase) * YEAR_DAYS);
    const seasonYear = new Date(centreDay * 86_400_000).getUTCFullYear();
    if (seasonYear !== calendarYear) otherYear += 1;
    if (shift > largest || (shift === largest && lines[n]! < largestLine)) { largest = shift; largestLine = lines[n]!; }
    time[n] = seasonYear;
  }
  const centre = new Date(Math.round(phase * YEAR_DAYS) * 86_400_000);
  const two = (x: number): string => String(x).padStart(2, '0');
  return { centre: `${two(centre.getUTCMonth() + 1)}-${two(centre.getUTCDate())}`, largestShiftDays: Math.round(largest), largestShiftLine: largestLine, otherYear, dates: count };
}
