import { afterAll, describe, expect, it } from 'vitest'
import {
  calendarDateIn, displayDate, displayDateTime, displayDay, displayDaysFrom, displayTime, displayTimeSpan, displayWeekOf,
} from '../../shared/utils/date-display'

// US daylight saving time ends on the first Sunday of November at 02:00 local time and starts on
// the second Sunday of March at 02:00 (15 U.S.C. 260a, as amended by the Energy Policy Act of
// 2005); Chicago is UTC-5 (CDT) in summer and UTC-6 (CST) in winter (IANA tz database,
// America/Chicago). Weekdays of the dates below: 1 Jan 2026 is a Thursday (ISO 8601 calendar;
// from memory, and checked here against Date.UTC's own weekday).
const CHICAGO = 'America/Chicago'

// The reader's device zone must never show through: every expectation holds whatever the
// process's zone is. Node applies a change of process.env.TZ at once.
const DEVICE_ZONES = ['UTC', 'Asia/Tokyo', 'America/Los_Angeles', 'Pacific/Kiritimati']
const original = process.env.TZ
afterAll(() => {
  if (original === undefined) delete process.env.TZ
  else process.env.TZ = original
})

function underEveryDeviceZone(check: () => void) {
  for (const zone of DEVICE_ZONES) {
    process.env.TZ = zone
    // The switch really happened (Tokyo is UTC+9 all year, Kiritimati UTC+14).
    if (zone === 'Asia/Tokyo') expect(new Date(Date.UTC(2026, 0, 1)).getTimezoneOffset()).toBe(-540)
    if (zone === 'Pacific/Kiritimati') expect(new Date(Date.UTC(2026, 0, 1)).getTimezoneOffset()).toBe(-840)
    check()
  }
}

describe('dates shown to people', () => {
  it('writes a calendar date as written, whatever the zone', () => {
    expect(new Date(Date.UTC(2026, 0, 1)).getUTCDay()).toBe(4) // Thursday
    underEveryDeviceZone(() => {
      expect(displayDate('2026-12-10')).toBe('Thu 10 Dec 2026')
      expect(displayDate('2026-12-10', 'Pacific/Kiritimati')).toBe('Thu 10 Dec 2026')
      expect(displayDate('2026-12-10', 'Pacific/Pago_Pago')).toBe('Thu 10 Dec 2026')
      expect(displayDay('2026-12-10')).toBe('Thu 10 Dec')
    })
  })

  it('shows a weekly 13:00 meeting at 13:00 on both sides of the November change in Chicago', () => {
    underEveryDeviceZone(() => {
      // 29 Oct: CDT, 18:00 UTC; 5 Nov: CST, 19:00 UTC. Same wall-clock time, different instants.
      expect(displayDateTime('2026-10-29T18:00:00.000Z', CHICAGO)).toBe('Thu 29 Oct 2026, 13:00')
      expect(displayDateTime('2026-11-05T19:00:00.000Z', CHICAGO)).toBe('Thu 5 Nov 2026, 13:00')
      // A device-zone reading would have put one of them at 12:00 or 14:00.
      expect(displayTime('2026-11-05T18:00:00.000Z', CHICAGO)).toBe('12:00')
    })
  })

  it('reads the repeated hour of 1 Nov 2026 and the skipped hour of 14 Mar 2027 in Chicago', () => {
    underEveryDeviceZone(() => {
      // 06:30 UTC is 01:30 CDT; an hour later, 07:30 UTC, is 01:30 CST.
      expect(displayDateTime('2026-11-01T06:30:00Z', CHICAGO)).toBe('Sun 1 Nov 2026, 01:30')
      expect(displayDateTime('2026-11-01T07:30:00Z', CHICAGO)).toBe('Sun 1 Nov 2026, 01:30')
      // Clocks jump from 01:59 CST to 03:00 CDT: a minute apart in UTC.
      expect(displayTime('2027-03-14T07:59:00Z', CHICAGO)).toBe('01:59')
      expect(displayTime('2027-03-14T08:00:00Z', CHICAGO)).toBe('03:00')
    })
  })

  it('puts an instant on the course’s day, not the reader’s', () => {
    underEveryDeviceZone(() => {
      // 03:00 UTC on 11 Dec is still the evening of 10 Dec in Chicago (CST, UTC-6).
      expect(displayDateTime('2026-12-11T03:00:00Z', CHICAGO)).toBe('Thu 10 Dec 2026, 21:00')
      expect(displayDate('2026-12-11T03:00:00Z', CHICAGO)).toBe('Thu 10 Dec 2026')
      expect(displayDateTime('2026-12-11T03:00:00Z', 'Asia/Tokyo')).toBe('Fri 11 Dec 2026, 12:00')
      expect(displayDateTime(new Date('2026-12-11T03:00:00Z'), 'UTC')).toBe('Fri 11 Dec 2026, 03:00')
    })
  })

  it('gives a meeting as one span, the end time only when it is the same day', () => {
    underEveryDeviceZone(() => {
      expect(displayTimeSpan('2026-11-05T19:00:00Z', '2026-11-05T21:50:00Z', CHICAGO)).toBe('Thu 5 Nov 2026, 13:00–15:50')
      expect(displayTimeSpan('2026-11-06T04:00:00Z', '2026-11-06T07:00:00Z', CHICAGO)).toBe('Thu 5 Nov 2026, 22:00–Fri 6 Nov 2026, 01:00')
    })
  })

  it('names a forecast week by its Monday, never by an ISO week code', () => {
    underEveryDeviceZone(() => {
      expect(new Date(Date.UTC(2026, 10, 30)).getUTCDay()).toBe(1) // Monday 30 Nov 2026
      expect(displayWeekOf('2026-11-30')).toBe('week of 30 Nov')
      expect(displayWeekOf('2026-11-30', { capital: true })).toBe('Week of 30 Nov')
      expect(displayWeekOf('2026-11-30')).not.toMatch(/W\d/)
    })
  })

  it('counts days to a deadline on the course’s calendar', () => {
    underEveryDeviceZone(() => {
      // Due 23:59 CST on 10 Dec (05:59 UTC on 11 Dec); it is 09:00 in Chicago on 10 Dec.
      const now = new Date('2026-12-10T15:00:00Z')
      expect(displayDaysFrom('2026-12-11T05:59:00Z', now, CHICAGO)).toBe('today')
      expect(displayDaysFrom('2026-12-11T05:59:00Z', now, 'UTC')).toBe('tomorrow')
      expect(displayDaysFrom('2026-12-13', now, CHICAGO)).toBe('in 3 days')
      expect(displayDaysFrom('2026-12-08', now, CHICAGO)).toBe('2 days ago')
      expect(displayDaysFrom('2026-12-09', now, CHICAGO)).toBe('yesterday')
      // Across the March change a day is 23 hours long; still one day.
      expect(displayDaysFrom('2027-03-15T05:00:00Z', new Date('2027-03-14T07:30:00Z'), CHICAGO)).toBe('tomorrow')
      expect(calendarDateIn(new Date('2026-12-11T03:00:00Z'), CHICAGO)).toBe('2026-12-10')
      expect(calendarDateIn(new Date('2026-12-11T03:00:00Z'), 'Asia/Tokyo')).toBe('2026-12-11')
    })
  })

  it('shows a dash for nothing and never "Invalid Date" for text it cannot read', () => {
    expect(displayDate(null)).toBe('—')
    expect(displayDateTime(undefined, CHICAGO)).toBe('—')
    expect(displayDate('2026-02-30')).toBe('2026-02-30')
    expect(displayDateTime('not a date', CHICAGO)).toBe('not a date')
    expect(displayDaysFrom(null, new Date(), CHICAGO)).toBe('')
  })
})
