import { describe, expect, it } from 'vitest'
import { forecastRangeErrors } from '../../shared/types/lib/date-range'
import { forecastQuerySchema } from '../../shared/types/stockroom'

// The forecast's range form checks its two dates without zod; it must place the same messages
// on the same fields as the route's schema, or a range the form lets through would come back refused.
function schemaErrors(range: { from: string, to: string }) {
  const result = forecastQuerySchema.safeParse(range)
  if (result.success) return {}
  const errors: Record<string, string> = {}
  for (const issue of result.error.issues) errors[issue.path.join('.')] ||= issue.message
  return errors
}

describe('the forecast range form without zod', () => {
  it.each([
    ['a four-week range', '2026-12-03', '2026-12-30'],
    ['one day', '2026-12-03', '2026-12-03'],
    // 2027 is not a leap year: no 29 February (Gregorian calendar rule).
    ['29 February in a common year', '2027-02-29', '2027-03-10'],
    ['an empty start', '', '2026-12-30'],
    ['both empty', '', ''],
    ['a day-first date', '03/12/2026', '2026-12-30'],
    ['an end before the start', '2026-12-30', '2026-12-03'],
    ['exactly 366 days', '2026-01-01', '2027-01-02'],
    ['367 days', '2026-01-01', '2027-01-03'],
    ['a year outside the teaching range', '1999-12-31', '2000-01-10'],
  ])('%s: the same errors as the route', (_case, from, to) => {
    expect(forecastRangeErrors({ from, to })).toEqual(schemaErrors({ from, to }))
  })

  it('names the field at fault', () => {
    expect(forecastRangeErrors({ from: '2026-12-30', to: '2026-12-03' })).toEqual({ to: 'Must be on or after from' })
    expect(forecastRangeErrors({ from: '2027-02-29', to: '2027-03-10' })).toEqual({ from: 'Not a calendar date' })
    expect(forecastRangeErrors({ from: '2026-12-03', to: '2026-12-30' })).toEqual({})
  })
})
