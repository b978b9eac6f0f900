import type { H3Event } from 'h3'
import { sql, type RawBuilder, type SelectQueryBuilder } from 'kysely'
import type { Course, Database, Section } from '../database/schema'
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

/** The ids of the courses the caller may see, as a subquery for a where clause (`id in …`). */
export function visibleCourseIdQuery(me: SessionUser): SelectQueryBuilder<Database, keyof Database, { id: number }> {
  const db = useDb()
  switch (me.role) {
    case 'instructor':
      return db.selectFrom('courseOwners').select('courseId as id').where('userId', '=', me.id)
    case 'coordinator':
      return db.selectFrom('courses').select('id')
    case 'ta':
      return db.selectFrom('sectionTas').innerJoin('sections', 'sections.id', 'sectionTas.sectionId')
        .select('sections.courseId as id').where('sectionTas.userId', '=', me.id)
    case 'student':
      return db.selectFrom('enrollments').select('courseId as id').where('userId', '=', me.id).where('status', '=', 'active')
  }
}

/** Course ids the caller may see at all, for list routes. */
export async function visibleCourseIds(me: SessionUser): Promise<number[]> {
  const rows = await visibleCourseIdQuery(me).distinct().execute()
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

/**
 * The caller's link to a practical's course, read in the same query as the practical: owning it
 * (instructor), their sections in it (TA, student), nothing to read (coordinator).
 */
function relationOf(me: SessionUser) {
  switch (me.role) {
    case 'instructor':
      return sql<number[] | null>`case when exists (select 1 from course_owners o where o.course_id = c.id and o.user_id = ${me.id})
        then '{}'::int[] end`
    case 'ta':
      return sql<number[] | null>`array(select s.id from section_tas st join sections s on s.id = st.section_id
        where st.user_id = ${me.id} and s.course_id = c.id)`
    case 'student':
      return sql<number[] | null>`array(select e.section_id from enrollments e
        where e.user_id = ${me.id} and e.course_id = c.id and e.status = 'active')`
    default:
      return sql<number[] | null>`'{}'::int[]`
  }
}

/** The scope courseScope() would give, from the relation read with the course. */
function scopeOf(me: SessionUser, course: Course, relation: number[] | null): CourseScope | null {
  switch (me.role) {
    case 'instructor':
      return relation ? { me, course, role: 'owner', sectionIds: null } : null
    case 'coordinator':
      return { me, course, role: 'coordinator', sectionIds: null }
    case 'ta':
      return relation?.length ? { me, course, role: 'ta', sectionIds: relation } : null
    case 'student':
      return relation?.length ? { me, course, role: 'student', sectionIds: relation } : null
  }
}

/**
 * Rows of `column` (a section id) the caller may see, as a where condition in a query that
 * joins a practical as `p` and its course as `c`: every section for its owners and the
 * coordinator, their own for TAs and students.
 */
export function visibleSectionCondition(me: SessionUser, column: string) {
  const own = visibleSectionIds(me)
  return own ? sql<boolean>`${sql.ref(column)} = any(${own})` : sql<boolean>`true`
}

/**
 * The sections of the course `c` a TA or student may see, as SQL (an int[]) for a query that
 * joins its course as `c`; null for every section (its owners, the coordinator).
 */
export function visibleSectionIds(me: SessionUser): RawBuilder<number[]> | null {
  return me.role === 'ta' || me.role === 'student' ? relationOf(me) as RawBuilder<number[]> : null
}

/**
 * A practical is visible to a TA or student only when it runs in one of their sections.
 * One query: the practical, its course, the caller's relation to it and its sessions' sections
 * (every route under /api/practicals/:id starts here).
 */
export async function requirePracticalAccess(
  event: H3Event,
  practicalId: number,
  mode: 'view' | 'manage' = 'view',
): Promise<PracticalScope> {
  return (await practicalAccess(event, practicalId, mode, null)).scope
}

/**
 * requirePracticalAccess, and in the same statement what the route reads next (`columns`: SQL
 * over the practical `p` and its course `c`, limited with visibleSectionCondition), so a page's
 * read costs one round trip. The columns are read before the caller's access is known, and
 * dropped when it has none.
 */
export async function requirePracticalAccessWith<T>(
  event: H3Event,
  practicalId: number,
  columns: (me: SessionUser) => RawBuilder<T>,
  mode: 'view' | 'manage' = 'view',
): Promise<{ scope: PracticalScope, columns: T }> {
  return practicalAccess(event, practicalId, mode, columns) as Promise<{ scope: PracticalScope, columns: T }>
}

type PracticalColumns = (me: SessionUser) => RawBuilder<unknown>

// One compiled statement per role and kind of extra columns (none, a page's).
const practicalAccessReads = new Map<PracticalColumns | null, ReturnType<typeof practicalAccessRead>>()

function practicalAccessRead(columns: PracticalColumns | null) {
  return readOnceCompiled((db, role: SessionUser['role'], userId: number, practicalId: number) => {
    const me = { id: userId, role, name: '' }
    return db.selectFrom('practicals as p').innerJoin('courses as c', 'c.id', 'p.courseId')
      .selectAll('c')
      .select([
        'p.id as practicalId', 'p.title as practicalTitle', 'p.substrateId', 'p.methodId', 'p.workUnit', 'p.notes', 'p.resultsReleasedAt',
        relationOf(me).as('relation'),
        sql<number[]>`array(select ps.section_id from practical_sessions ps where ps.practical_id = p.id order by ps.id)`
          .as('sessionSections'),
        (columns ? columns(me) : sql<null>`null`).as('readWith'),
      ])
      .where('p.id', '=', practicalId)
  })
}

async function practicalAccess(
  event: H3Event,
  practicalId: number,
  mode: 'view' | 'manage',
  columns: PracticalColumns | null,
): Promise<{ scope: PracticalScope, columns: unknown }> {
  const me = requireUser(event)
  let read = practicalAccessReads.get(columns)
  if (!read) practicalAccessReads.set(columns, read = practicalAccessRead(columns))
  const [row] = await read(me.role, me.id, practicalId)
  if (!row) throw notFound('Practical')
  const {
    practicalId: id, practicalTitle: title, substrateId, methodId, workUnit, notes, resultsReleasedAt, relation, sessionSections, readWith,
    ...course
  } = row
  const scope = scopeOf(me, course, relation)
  if (!scope) throw notFound('Practical')
  const practical = { id, courseId: course.id, title, substrateId, methodId, workUnit, notes, resultsReleasedAt }
  const sessionSectionIds = sessionSections.filter((sectionId) => !scope.sectionIds || scope.sectionIds.includes(sectionId))
  if (scope.sectionIds && !sessionSectionIds.length) throw notFound('Practical')
  if (mode === 'manage' && scope.role !== 'owner') throw forbidden('Only the course’s instructors can change practicals')
  return { scope: { ...scope, practical, sessionSectionIds }, columns: readWith }
}
