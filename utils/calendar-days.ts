/**
 * A 'YYYY-MM-DD' moved by whole days, on the calendar alone (no zone, no clock change), without
 * loading a date library into the page. The server's twin is addDays in shared/utils/dates.ts.
 */
export function shiftDate(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10)
}
