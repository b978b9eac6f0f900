import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database, Section } from '../../database/schema'
import type { SectionMode, SectionScope } from '../../utils/access'
import { findConflicts } from '#shared/utils/schedule'
import type { RosterConflictView, RosterStudent, SectionRosterView } from '#shared/types/roster'
import { requireSectionAccess } from '../../utils/access'
import { useDb } from '../../utils/db'
import { hasJoined, invitationStateOf } from './invitations'
import { createError } from 'h3'

// One section's roster: who is in it, where they sit, and the changes made to one student.

type Db = Kysely<Database> | Transaction<Database>

const byName = (a: { name: string, id: number }, b: { name: string, id: number }) =>
  a.name.localeCompare(b.name, 'en', { sensitivity: 'base' }) || a.id - b.id

export async function loadSectionRoster(db: Db, section: Section): Promise<SectionRosterView> {
  const rows = await db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['enrollments.id', 'enrollments.userId', 'enrollments.status', 'enrollments.station', 'enrollments.seat',
      'enrollments.withdrawnAt', 'enrollments.studentId', 'users.name', 'users.email', 'users.passwordHash', 'users.campusJoinedAt'])
    .where('enrollments.sectionId', '=', section.id).execute()
  const userIds = [...new Set(rows.map((r) => r.userId))]
  const latest = userIds.length
    ? await db.selectFrom('invitations').select(['userId', 'expiresAt', 'usedAt']).distinctOn('userId')
        .where('userId', 'in', userIds).orderBy('userId').orderBy('createdAt', 'desc').orderBy('id', 'desc').execute()
    : []
  const invitationOf = new Map(latest.map((i) => [i.userId, i]))
  const active = rows.filter((r) => r.status === 'active')
  const students: RosterStudent[] = rows.sort(byName).map((r) => ({
    id: r.id,
    userId: r.userId,
    name: r.name,
    email: r.email,
    studentId: r.studentId,
    status: r.status,
    station: r.station,
    seat: r.seat,
    partners: r.status !== 'active' || r.station === null
      ? []
      : active.filter((o) => o.id !== r.id && o.station === r.station).sort((a, b) => (a.seat ?? 0) - (b.seat ?? 0)).map((o) => o.name),
    invitation: invitationStateOf({
      joined: hasJoined(r),
      lastExpiresAt: invitationOf.get(r.userId)?.expiresAt ?? null,
      lastUsedAt: invitationOf.get(r.userId)?.usedAt ?? null,
    }),
    withdrawnAt: r.withdrawnAt?.toISOString() ?? null,
  }))
  return {
    sectionId: section.id, courseId: section.courseId, code: section.code,
    hoodStations: section.hoodStations, studentsPerStation: section.studentsPerStation, students,
  }
}

export async function rosterActiveCount(db: Db, sectionId: number): Promise<number> {
  const row = await db.selectFrom('enrollments').select((eb) => eb.fn.countAll<number>().as('n'))
    .where('sectionId', '=', sectionId).where('status', '=', 'active').executeTakeFirstOrThrow()
  return Number(row.n)
}

/** The schedule's capacity rule for one section holding `enrolled` students. */
export function rosterCapacityFor(section: Section, enrolled: number): RosterConflictView[] {
  return findConflicts([{
    sectionId: section.id, label: section.code, room: section.room, taIds: [], meetings: [],
    enrolled, hoodStations: section.hoodStations, studentsPerStation: section.studentsPerStation,
  }]).map((c) => ({ kind: 'capacity' as const, sectionIds: c.sectionIds, message: c.message }))
}

/** Station s, seat k for the i-th student: 1..studentsPerStation at each station in turn. */
export function rosterStationPlaces(count: number, section: Pick<Section, 'hoodStations' | 'studentsPerStation'>) {
  const places = section.hoodStations * section.studentsPerStation
  if (count > places) return null
  return Array.from({ length: count }, (_, i) => ({
    station: Math.floor(i / section.studentsPerStation) + 1,
    seat: (i % section.studentsPerStation) + 1,
  }))
}

/** Everyone active at one hood station of a section, in seat order: a student and their partners. */
export function stationMates(db: Db, sectionId: number, station: number) {
  return db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['enrollments.userId', 'users.name', 'enrollments.seat'])
    .where('enrollments.sectionId', '=', sectionId).where('enrollments.station', '=', station)
    .where('enrollments.status', '=', 'active').orderBy('enrollments.seat').execute()
}

/** A student's partners by name: the others at their station, in seat order. */
export async function partnerNames(db: Db, student: { userId: number, sectionId: number, station: number | null }): Promise<string[]> {
  if (student.station === null) return []
  const mates = await stationMates(db, student.sectionId, student.station)
  return mates.filter((m) => m.userId !== student.userId).map((m) => m.name)
}

/** Active students of a section in name order, with where they sit now. */
export async function rosterActiveStudents(db: Db, sectionId: number) {
  const rows = await db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['enrollments.id', 'users.name', 'enrollments.station', 'enrollments.seat'])
    .where('enrollments.sectionId', '=', sectionId).where('enrollments.status', '=', 'active').execute()
  return rows.sort(byName)
}

export interface EnrollmentInScope {
  enrollment: {
    id: number
    courseId: number
    sectionId: number
    userId: number
    status: 'active' | 'withdrawn'
    station: number | null
    seat: number | null
  }
  scope: SectionScope
}

/** The enrolment, through its section's scope: 404 when the caller may not see that section. */
export async function requireEnrollmentAccess(event: H3Event, id: number, mode: SectionMode): Promise<EnrollmentInScope> {
  const enrollment = await useDb().selectFrom('enrollments')
    .select(['id', 'courseId', 'sectionId', 'userId', 'status', 'station', 'seat'])
    .where('id', '=', id).executeTakeFirst()
  if (!enrollment) throw createError({ statusCode: 404, statusMessage: 'Enrolment not found' })
  const scope = await requireSectionAccess(event, enrollment.sectionId, mode)
  return { enrollment, scope }
}

/**
 * Puts the student on a station and seat. Whoever sat there takes the student's old place
 * (or none): the seat index allows one student per seat, so the other is lifted first.
 */
export async function rosterPlaceStudent(trx: Transaction<Database>, e: EnrollmentInScope['enrollment'], station: number | null,
  seat: number | null) {
  const occupant = station === null
    ? undefined
    : await trx.selectFrom('enrollments').select(['id']).where('sectionId', '=', e.sectionId).where('status', '=', 'active')
        .where('station', '=', station).where('seat', '=', seat).where('id', '<>', e.id).executeTakeFirst()
  if (occupant) await trx.updateTable('enrollments').set({ station: null, seat: null }).where('id', '=', occupant.id).execute()
  await trx.updateTable('enrollments').set({ station, seat }).where('id', '=', e.id).execute()
  if (occupant) await trx.updateTable('enrollments').set({ station: e.station, seat: e.seat }).where('id', '=', occupant.id).execute()
  return occupant ? { swappedWith: occupant.id } : {}
}
