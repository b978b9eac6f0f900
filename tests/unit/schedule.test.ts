import { describe, expect, it } from 'vitest'
import { findConflicts, sectionMeetings, type ScheduledSection, type SectionTimetable } from '../../shared/utils/schedule'
import { zonedInstant } from '../../shared/utils/dates'

const base: SectionTimetable = {
  weekday: 1, startTime: '08:30', endTime: '11:20', firstDate: '2026-10-19', lastDate: '2026-11-16', skippedDates: [], timezone: 'America/Chicago',
}

describe('sectionMeetings', () => {
  it('lists every Monday in range and leaves out skipped dates', () => {
    const meetings = sectionMeetings({ ...base, skippedDates: ['2026-11-02'] })
    expect(meetings.map((m) => m.date)).toEqual(['2026-10-19', '2026-10-26', '2026-11-09', '2026-11-16'])
  })

  it('starts on the first matching weekday on or after the first date', () => {
    // 2026-10-21 is a Wednesday (ISO 8601 calendar); the next Monday is 2026-10-26.
    expect(sectionMeetings({ ...base, firstDate: '2026-10-21' })[0]!.date).toBe('2026-10-26')
    // Thursday sections: 2026-10-22 is a Thursday.
    expect(sectionMeetings({ ...base, weekday: 4 })[0]!.date).toBe('2026-10-22')
  })

  it('keeps the local start time across the end of daylight saving time', () => {
    // US rule (Energy Policy Act of 2005; IANA tz database): CDT (UTC−5) ends on the first
    // Sunday of November, 2026-11-01, and CST (UTC−6) begins.
    const meetings = sectionMeetings(base)
    expect(meetings[1]).toMatchObject({ date: '2026-10-26', start: '2026-10-26T13:30:00.000Z', end: '2026-10-26T16:20:00.000Z' })
    expect(meetings[2]).toMatchObject({ date: '2026-11-02', start: '2026-11-02T14:30:00.000Z' })
  })

  it('and across its start in March', () => {
    // Second Sunday of March 2027 is 2027-03-14: CST (UTC−6) → CDT (UTC−5).
    const spring = sectionMeetings({ ...base, firstDate: '2027-03-08', lastDate: '2027-03-15' })
    expect(spring.map((m) => m.start)).toEqual(['2027-03-08T14:30:00.000Z', '2027-03-15T13:30:00.000Z'])
  })

  it('returns nothing when the range holds no such weekday', () => {
    expect(sectionMeetings({ ...base, firstDate: '2026-10-20', lastDate: '2026-10-23' })).toEqual([])
  })

  it('refuses malformed dates and times', () => {
    expect(() => sectionMeetings({ ...base, firstDate: '19/10/2026' })).toThrow(/date/)
    expect(() => zonedInstant('2026-10-19', '25:00', 'America/Chicago')).toThrow(/time/)
  })
})

function section(id: number, over: Partial<SectionTimetable> & { room?: string, taIds?: number[] } = {}): ScheduledSection {
  const { room = 'Bellweather Hall 214', taIds = [], ...timetable } = over
  return { sectionId: id, label: `S${id}`, room, taIds, meetings: sectionMeetings({ ...base, ...timetable }) }
}

describe('findConflicts', () => {
  it('finds a TA in two sections of different courses at overlapping times', () => {
    const a = section(1, { taIds: [7], room: 'Room A' })
    const b = section(2, { taIds: [7], room: 'Room B', startTime: '10:00', endTime: '12:50' })
    const conflicts = findConflicts([a, b], { 7: 'Tobias' })
    expect(conflicts).toHaveLength(1)
    expect(conflicts[0]).toMatchObject({ kind: 'ta-overlap', taId: 7, sectionIds: [1, 2] })
    expect(conflicts[0]!.dates).toHaveLength(5)
    expect(conflicts[0]!.message).toContain('Tobias')
  })

  it('back-to-back sessions do not clash (end is exclusive)', () => {
    const a = section(1, { taIds: [7] })
    const b = section(2, { taIds: [7], room: 'Elsewhere', startTime: '11:20', endTime: '13:00' })
    expect(findConflicts([a, b])).toEqual([])
  })

  it('finds a double-booked room, ignoring case and spacing, only on shared dates', () => {
    const a = section(1, { room: 'Bellweather Hall 214' })
    const b = section(2, { room: ' bellweather  hall 214', firstDate: '2026-11-09' })
    const conflicts = findConflicts([a, b])
    expect(conflicts.map((c) => c.kind)).toEqual(['room-overlap'])
    expect(conflicts[0]!.dates).toEqual(['2026-11-09', '2026-11-16'])
  })

  it('a skipped date removes the clash on that date', () => {
    const a = section(1, { skippedDates: ['2026-11-09', '2026-11-16'] })
    const b = section(2, { firstDate: '2026-11-09' })
    expect(findConflicts([a, b])).toEqual([])
  })

  it('compares instants, so sections in different zones clash only when they really overlap', () => {
    // 08:30–11:20 in Chicago is 09:30–12:20 in New York (one hour apart all year: both follow US DST rules).
    const chicago = section(1, { taIds: [3], room: 'X' })
    const newYork = section(2, { taIds: [3], room: 'Y', timezone: 'America/New_York', startTime: '12:20', endTime: '13:00' })
    expect(findConflicts([chicago, newYork])).toEqual([])
    const clash = section(3, { taIds: [3], room: 'Z', timezone: 'America/New_York', startTime: '12:00', endTime: '12:30' })
    expect(findConflicts([chicago, clash]).map((c) => c.kind)).toEqual(['ta-overlap'])
  })

  it('flags a section over its hood capacity', () => {
    const full = { ...section(1), enrolled: 25, hoodStations: 12, studentsPerStation: 2 }
    const fine = { ...section(2, { room: 'Other' }), enrolled: 24, hoodStations: 12, studentsPerStation: 2 }
    const conflicts = findConflicts([full, fine])
    expect(conflicts).toEqual([expect.objectContaining({ kind: 'capacity', sectionIds: [1] })])
    expect(conflicts[0]!.message).toContain('24 places')
  })
})
