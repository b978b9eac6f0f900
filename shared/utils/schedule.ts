// Meetings of a lab section and the conflicts between sections. Pure: wall-clock times in a
// named time zone become UTC instants (so a term that crosses a daylight-saving change keeps
// its 08:30 start), and conflicts are found on those instants.
import { addDays, isoWeekday, zonedInstant } from './dates'
import { displayDate } from './date-display'

export interface SectionTimetable {
  /** ISO weekday: 1 = Monday … 7 = Sunday. */
  weekday: number
  /** 'HH:MM' or 'HH:MM:SS', local to `timezone`. */
  startTime: string
  endTime: string
  /** 'YYYY-MM-DD', inclusive. */
  firstDate: string
  lastDate: string
  skippedDates: string[]
  /** IANA zone, e.g. 'America/Chicago'. */
  timezone: string
}

export interface Meeting {
  date: string
  /** UTC instants, ISO 8601. */
  start: string
  end: string
}

const DAY_MS = 86_400_000
const MAX_MEETINGS = 400

// Turning wall-clock times into instants goes through the zone's rules for every meeting; a
// department's 80 sections made that most of a page's time. A timetable's meetings depend on it
// alone, so the last few thousand are kept (as copies: callers may change what they get).
const MEETINGS_KEPT = 4000
const meetingsKept = new Map<string, Meeting[]>()

/** Every meeting from the first to the last date on the section's weekday, minus skipped dates. */
export function sectionMeetings(t: SectionTimetable): Meeting[] {
  const key = JSON.stringify([t.weekday, t.startTime, t.endTime, t.firstDate, t.lastDate, t.skippedDates, t.timezone])
  let meetings = meetingsKept.get(key)
  if (!meetings) {
    meetings = computeMeetings(t)
    if (meetingsKept.size >= MEETINGS_KEPT) meetingsKept.delete(meetingsKept.keys().next().value!)
    meetingsKept.set(key, meetings)
  }
  return meetings.map((m) => ({ ...m }))
}

function computeMeetings(t: SectionTimetable): Meeting[] {
  const skipped = new Set(t.skippedDates)
  const meetings: Meeting[] = []
  let date = addDays(t.firstDate, (t.weekday - isoWeekday(t.firstDate) + 7) % 7)
  for (; date <= t.lastDate && meetings.length < MAX_MEETINGS; date = addDays(date, 7)) {
    if (skipped.has(date)) continue
    meetings.push({
      date,
      start: zonedInstant(date, t.startTime, t.timezone).toISOString(),
      end: zonedInstant(date, t.endTime, t.timezone).toISOString(),
    })
  }
  return meetings
}

export interface ScheduledSection {
  sectionId: number
  label: string
  room: string
  taIds: number[]
  meetings: Meeting[]
  /** Active students, hood stations and students per station, for the capacity check. */
  enrolled?: number
  hoodStations?: number
  studentsPerStation?: number
}

export type ConflictKind = 'ta-overlap' | 'room-overlap' | 'capacity'

export interface Conflict {
  kind: ConflictKind
  sectionIds: number[]
  /** Dates on which the clash happens (empty for capacity). */
  dates: string[]
  taId?: number
  room?: string
  message: string
}

const roomKey = (room: string) => room.trim().toLowerCase().replace(/\s+/g, ' ')

function overlappingDates(a: Meeting[], b: Meeting[]): string[] {
  const byDate = new Map(b.map((m) => [m.date, m]))
  const dates: string[] = []
  for (const m of a) {
    // Meetings near midnight in different zones could clash across dates; compare instants too.
    const nearby = b.filter((x) => x.date !== m.date && Math.abs(Date.parse(x.start) - Date.parse(m.start)) < DAY_MS)
    for (const other of [byDate.get(m.date), ...nearby]) {
      if (other && m.start < other.end && other.start < m.end) { dates.push(m.date); break }
    }
  }
  return dates
}

function describeDates(dates: string[]) {
  const shown = dates.slice(0, 3).map((d) => displayDate(d)).join(', ')
  return dates.length > 3 ? `${shown} and ${dates.length - 3} more` : shown
}

/** A TA in two places at once, a room booked twice, or a section with more students than seats. */
export function findConflicts(sections: ScheduledSection[], taNames: Record<number, string> = {}): Conflict[] {
  const conflicts: Conflict[] = []
  for (let i = 0; i < sections.length; i++) {
    for (let j = i + 1; j < sections.length; j++) {
      const a = sections[i]!
      const b = sections[j]!
      const sharedTas = a.taIds.filter((id) => b.taIds.includes(id))
      const sameRoom = roomKey(a.room) === roomKey(b.room)
      if (!sharedTas.length && !sameRoom) continue
      const dates = overlappingDates(a.meetings, b.meetings)
      if (!dates.length) continue
      for (const taId of sharedTas) {
        conflicts.push({
          kind: 'ta-overlap', sectionIds: [a.sectionId, b.sectionId], dates, taId,
          message: `${taNames[taId] ?? 'A TA'} would teach ${a.label} and ${b.label} at the same time (${describeDates(dates)}).`,
        })
      }
      if (sameRoom) {
        conflicts.push({
          kind: 'room-overlap', sectionIds: [a.sectionId, b.sectionId], dates, room: a.room,
          message: `${a.room} is booked for both ${a.label} and ${b.label} (${describeDates(dates)}).`,
        })
      }
    }
  }
  for (const s of sections) {
    if (s.enrolled === undefined || s.hoodStations === undefined) continue
    const seats = s.hoodStations * (s.studentsPerStation ?? 1)
    if (s.enrolled > seats) {
      conflicts.push({
        kind: 'capacity', sectionIds: [s.sectionId], dates: [],
        message: `${s.label} has ${s.enrolled} students but ${s.hoodStations} hood stations × ${s.studentsPerStation ?? 1} = ${seats} places.`,
      })
    }
  }
  return conflicts
}
