import { describe, expect, it } from 'vitest'
import { shiftDate } from '../../utils/calendar-days'
import { addDays } from '../../shared/utils/dates'

// The pages' light day arithmetic must agree with the server's date-fns one, across month and
// year ends, leap days and the days clocks change (which a zone-less calendar date must ignore).
describe('shiftDate', () => {
  it('agrees with addDays (date-fns) for every day of 2024-2027, moved -400 to +400 days', () => {
    let date = '2024-01-01'
    for (let i = 0; i < 4 * 366; i++) {
      for (const days of [-400, -31, -7, -1, 0, 1, 6, 27, 55, 400]) expect(shiftDate(date, days)).toBe(addDays(date, days))
      date = addDays(date, 1)
    }
  })

  it('reads a leap day and the US and EU clock-change weekends as plain days', () => {
    expect(shiftDate('2028-02-28', 1)).toBe('2028-02-29')
    expect(shiftDate('2027-02-28', 1)).toBe('2027-03-01')
    expect(shiftDate('2026-03-07', 1)).toBe('2026-03-08')
    expect(shiftDate('2026-10-25', 7)).toBe('2026-11-01')
  })
})
