import type { H3Event } from 'h3'
import type { Course, Section } from '../database/schema'
import type { SessionUser } from '#shared/types/auth'

// The few functions that load an object the caller may see, or throw. Every route uses them;
// the caller's scope is part of each query's where clause, never checked after the fact.
//   owner       an instructor who owns (or co-owns) the course: everything
//   ta          a TA of at least one of its sections: their sections only
//   coordinator the stockroom: the schedule, read-only; no rosters, grades or submissions
//   student     enrolled (active) in one of its sections: that section only

export type CourseRole = 'owner' | 'ta' | 'coordinator' | 'student'

export interface CourseScope {
  me: SessionUser
  course: Course
  role: CourseRole
  /** Sections the caller may see; null means every section of the course. */
  sectionIds: number[] | null
}

const notFound = (what: string) => createError({ statusCode: 404, statusMessage: `${what} not found` })
const forbidden = (why: string) => createError({ statusCode: 403, statusMessage: why })

async function ownsCourse(userId: number, courseId: number) {
  const row = await useDb().selectFrom('courseOwners').select('userId')
    .where('courseId', '=', courseId).where('userId', '=', userId).executeTakeFirst()
  return Boolean(row)
}

async function taSectionIds(userId: number, courseId: number) {
  const rows = await useDb().selectFrom('sectionTas').innerJoin('sections', 'sections.id', 'sectionTas.sectionId')
    .select('sections.id').where('sectionTas.userId', '=', userId).where('sections.courseId', '=', courseId).execute()
  return rows.map((r) => r.id)
}

async function studentSectionIds(userId: number, courseId: number) {
  const rows = await useDb().selectFrom('enrollments').select('sectionId')
    .where('userId', '=', userId).where('courseId', '=', courseId).where('status', '=', 'active').execute()
  return rows.map((r) => r.sectionId)
}

/** The caller's relation to a course, or 404 when they have none (existence is not revealed). */
export async function courseScope(me: SessionUser, course: Course): Promise<CourseScope | null> {
  switch (me.role) {
    case 'instructor':
      return (await ownsCourse(me.id, course.id)) ? { me, course, role: 'owner', sectionIds: null } : null
    case 'coordinator':
      return { me, course, role: 'coordinator', sectionIds: null }
    case 'ta': {
      const ids = await taSectionIds(me.id, course.id)
      return ids.length ? { me, course, role: 'ta', sectionIds: ids } : null
    }
    case 'student': {
      const ids = await studentSectionIds(me.id, course.id)
      return ids.length ? { me, course, role: 'student', sectionIds: ids } : null
    }
  }
}

export async function requireCourseAccess(event: H3Event, courseId: number, mode: 'view' | 'manage' = 'view'): Promise<CourseScope> {
  const me = requireUser(event)
  const course = await useDb().selectFrom('courses').selectAll().where('id', '=', courseId).executeTakeFirst()
  const scope = course && (await courseScope(me, course))
  if (!scope) throw notFound('Course')
  if (mode === 'manage' && scope.role !== 'owner') throw forbidden('Only the course’s instructors can change it')
  return scope
}

export type SectionMode = 'view' | 'roster' | 'manage'

export interface SectionScope extends CourseScope {
  section: Section
}

/**
 * view: the section's timetable (owner, its TAs, the coordinator, its students);
 * roster: who is in it (owner, its TAs); manage: change it (owner).
 */
export async function requireSectionAccess(event: H3Event, sectionId: number, mode: SectionMode = 'view'): Promise<SectionScope> {
  const me = requireUser(event)
  const section = await useDb().selectFrom('sections').selectAll().where('id', '=', sectionId).executeTakeFirst()
  const course = section && await useDb().selectFrom('courses').selectAll().where('id', '=', section.courseId).executeTakeFirst()
  const scope = course && (await courseScope(me, course))
  if (!section || !scope || (scope.sectionIds && !scope.sectionIds.includes(section.id))) throw notFound('Section')
  if (mode === 'roster' && scope.role !== 'owner' && scope.role !== 'ta') {
    throw forbidden('Rosters are for the course’s instructors and the section’s TAs')
  }
  if (mode === 'manage' && scope.role !== 'owner') throw forbidden('Only the course’s instructors can change sections')
  return { ...scope, section }
}

/** Course ids the caller may see at all, for list routes. */
export async function visibleCourseIds(me: SessionUser): Promise<number[]> {
  const db = useDb()
  let rows: Array<{ id: number }>
  switch (me.role) {
    case 'instructor':
      rows = await db.selectFrom('courseOwners').select('courseId as id').where('userId', '=', me.id).execute()
      break
    case 'coordinator':
      rows = await db.selectFrom('courses').select('id').execute()
      break
    case 'ta':
      rows = await db.selectFrom('sectionTas').innerJoin('sections', 'sections.id', 'sectionTas.sectionId')
        .select('sections.courseId as id').distinct().where('sectionTas.userId', '=', me.id).execute()
      break
    case 'student':
      rows = await db.selectFrom('enrollments').select('courseId as id').distinct()
        .where('userId', '=', me.id).where('status', '=', 'active').execute()
      break
  }
  return rows.map((r) => r.id)
}

export interface PracticalScope extends CourseScope {
  practical: {
    id: number
    courseId: number
    title: string
    substrateId: number
    methodId: number
    workUnit: 'student' | 'pair'
    notes: string
    resultsReleasedAt: Date | null
  }
  /** Sessions of this practical the caller may see (their sections only for TAs and students). */
  sessionSectionIds: number[]
}

/** A practical is visible to a TA or student only when it runs in one of their sections. */
export async function requirePracticalAccess(
  event: H3Event,
  practicalId: number,
  mode: 'view' | 'manage' = 'view',
): Promise<PracticalScope> {
  const me = requireUser(event)
  const db = useDb()
  const practical = await db.selectFrom('practicals')
    .select(['id', 'courseId', 'title', 'substrateId', 'methodId', 'workUnit', 'notes', 'resultsReleasedAt'])
    .where('id', '=', practicalId).executeTakeFirst()
  const course = practical && await db.selectFrom('courses').selectAll().where('id', '=', practical.courseId).executeTakeFirst()
  const scope = course && (await courseScope(me, course))
  if (!practical || !scope) throw notFound('Practical')
  const sessions = await db.selectFrom('practicalSessions').select('sectionId').where('practicalId', '=', practical.id).execute()
  const sessionSectionIds = sessions.map((s) => s.sectionId).filter((id) => !scope.sectionIds || scope.sectionIds.includes(id))
  if (scope.sectionIds && !sessionSectionIds.length) throw notFound('Practical')
  if (mode === 'manage' && scope.role !== 'owner') throw forbidden('Only the course’s instructors can change practicals')
  return { ...scope, practical, sessionSectionIds }
}
