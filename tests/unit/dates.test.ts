import { describe, expect, it } from 'vitest'
import { differenceInCalendarDays, format, parseISO } from 'date-fns'
import { tz } from '@date-fns/tz'
import {
  addDays, addMonths, daysBetween, isCalendarDate, isoDateOf, isoWeekday, isoWeekLabel, todayIn, weekStart, zonedInstant,
} from '../../shared/utils/dates'

const IN_UTC = { in: tz('UTC') }

describe('calendar dates', () => {
  it('moves by days across month, year and leap-day ends', () => {
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01')
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29') // 2028 is a leap year (Gregorian rule: divisible by 4, not by 100)
    expect(addDays('2027-03-01', -1)).toBe('2027-02-28')
    expect(daysBetween('2027-02-01', '2027-03-01')).toBe(28)
    expect(daysBetween('2027-03-01', '2027-02-01')).toBe(-28)
  })

  it('counts days as date-fns does, across leap days, year ends and years below 100', () => {
    // The reference is date-fns' own differenceInCalendarDays at UTC midnights.
    const reference = (from: string, to: string) => differenceInCalendarDays(parseISO(to, IN_UTC), parseISO(from, IN_UTC), IN_UTC)
    const dates = ['2000-02-28', '2000-02-29', '2000-03-01', '2026-03-08', '2026-11-01', '2027-12-31', '2028-01-01', '2100-12-31',
      '0050-06-15', '0099-12-31', '0100-01-01']
    for (const from of dates) for (const to of dates) expect(daysBetween(from, to), `${from} to ${to}`).toBe(reference(from, to))
    expect(daysBetween('2028-01-01', '2029-01-01')).toBe(366) // 2028 is a leap year (Gregorian rule)
    expect(() => daysBetween('2027-02-29', '2027-03-01')).toThrow(RangeError)
  })

  it('adds months with one rule: a missing day becomes the month’s last (common practice for shelf lives)', () => {
    expect(addMonths('2027-01-31', 1)).toBe('2027-02-28')
    expect(addMonths('2028-01-31', 1)).toBe('2028-02-29')
    expect(addMonths('2027-03-15', 24)).toBe('2029-03-15')
    expect(addMonths('2027-05-31', -1)).toBe('2027-04-30')
  })

  it('knows ISO 8601 weeks: Monday starts them, the Thursday decides the year', () => {
    expect(isoWeekday('2027-03-08')).toBe(1)
    expect(isoWeekday('2027-03-14')).toBe(7)
    expect(weekStart('2027-01-01')).toBe('2026-12-28')
    // ISO 8601: 2026 begins on a Thursday, so it has 53 weeks and 1 January 2027 is in 2026-W53.
    expect(isoWeekLabel('2027-01-01')).toBe('2026-W53')
    expect(isoWeekLabel('2027-01-04')).toBe('2027-W01')
  })

  it('tells real calendar dates from impossible ones', () => {
    expect(isCalendarDate('2028-02-29')).toBe(true)
    expect(isCalendarDate('2027-02-29')).toBe(false)
    expect(isCalendarDate('2027-04-31')).toBe(false)
    expect(isCalendarDate('2027-4-1')).toBe(false)
  })

  it('puts an instant on the calendar of a named zone, never the machine’s', () => {
    // 03:00 UTC on 2 Nov 2026 is still 1 Nov in Chicago (UTC−6 after the DST end on 1 Nov, IANA tz database).
    expect(isoDateOf('2026-11-02T03:00:00Z', 'America/Chicago')).toBe('2026-11-01')
    expect(isoDateOf('2026-11-02T03:00:00Z')).toBe('2026-11-02')
    // The UTC shortcut agrees with date-fns' own UTC formatting, at both ends of a day and of a year.
    for (const at of ['2026-12-31T23:59:59.999Z', '2027-01-01T00:00:00Z', '2028-02-29T12:00:00Z', '0099-12-31T23:00:00Z']) {
      expect(isoDateOf(at), at).toBe(format(new Date(at), 'yyyy-MM-dd', IN_UTC))
    }
    expect(todayIn('Pacific/Kiritimati', new Date('2026-11-01T12:00:00Z'))).toBe('2026-11-02') // UTC+14
  })

  it('turns wall-clock times in a zone into instants across a daylight-saving change', () => {
    // America/Chicago: CDT (UTC−5) until 1 Nov 2026, CST (UTC−6) after (IANA tz database).
    expect(zonedInstant('2026-10-26', '08:30', 'America/Chicago').toISOString()).toBe('2026-10-26T13:30:00.000Z')
    expect(zonedInstant('2026-11-02', '08:30', 'America/Chicago').toISOString()).toBe('2026-11-02T14:30:00.000Z')
    expect(() => zonedInstant('2026-11-02', '24:00', 'America/Chicago')).toThrow(/time/)
  })
})
