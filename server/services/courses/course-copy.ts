import { sql, type Kysely, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Course, Database } from '../../database/schema'
import { audit, type Actor } from '../../utils/audit'
import { invalid } from '../../utils/validation'
import type { CopiedPracticalView, CopiedSectionView, CourseCopyPreview, courseCopySchema } from '#shared/types/course-copy'
import { displayDate } from '#shared/utils/date-display'
import { sectionMeetings } from '#shared/utils/schedule'
import { shiftTimetable, type TermShift } from '#shared/utils/term-shift'
import { conflictsOfNewSections } from '../sections'

// Copying a course into a new term: its settings and rubric, its practicals (library choices,
// scale, sessions) and its sections' pattern, every date moved by the same whole number of weeks
// (shared/utils/term-shift.ts). Students, enrolments, uploads, reviews, digests and skipped dates
// stay with the old term; TAs come along only when asked. `previewCourseCopy` reads only;
// `copyCourse` writes the whole copy and its audit row in one transaction. The caller has checked
// that the actor owns the course.

type Db = Kysely<Database> | Transaction<Database>
export type CourseCopyFields = z.output<typeof courseCopySchema>

/** Everything the copy is made from, read once (inside the write's transaction for copyCourse). */
async function loadSource(db: Db, course: Course) {
  const sections = await db.selectFrom('sections').selectAll().where('courseId', '=', course.id)
    .orderBy('weekday').orderBy('startTime').orderBy('code').execute()
  const sectionIds = sections.map((s) => s.id)
  const tas = sectionIds.length
    ? await db.selectFrom('sectionTas').innerJoin('users', 'users.id', 'sectionTas.userId')
        .select(['sectionTas.sectionId', 'users.id', 'users.name']).where('sectionTas.sectionId', 'in', sectionIds)
        .orderBy('users.name').execute()
    : []
  const practicals = await db.selectFrom('practicals')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .selectAll('practicals').select(['substrates.name as substrateName', 'methods.name as methodName'])
    .where('practicals.courseId', '=', course.id).orderBy('practicals.id').execute()
  const practicalIds = practicals.map((p) => p.id)
  const items = practicalIds.length
    ? await db.selectFrom('practicalItems').selectAll().where('practicalId', 'in', practicalIds).orderBy('position').execute()
    : []
  const sessions = practicalIds.length
    ? await db.selectFrom('practicalSessions').selectAll().where('practicalId', 'in', practicalIds).orderBy('meetingDate').execute()
    : []
  return { sections, tas, practicals, items, sessions }
}
type Source = Awaited<ReturnType<typeof loadSource>>

/** What stays behind, counted: the preview lists it so nothing is expected that will not come. */
async function leftBehind(db: Db, course: Course, source: Source, keepTas: boolean): Promise<CourseCopyPreview['notCopied']> {
  const practicalIds = source.practicals.map((p) => p.id)
  const count = sql<number>`count(*)::int`.as('n')
  const enrolments = await db.selectFrom('enrollments').select(count).where('courseId', '=', course.id).executeTakeFirstOrThrow()
  const runs = practicalIds.length
    ? await db.selectFrom('submissions').select(count).where('practicalId', 'in', practicalIds).executeTakeFirstOrThrow()
    : { n: 0 }
  const reviews = practicalIds.length
    ? await db.selectFrom('reviews').innerJoin('submissions', 'submissions.id', 'reviews.submissionId').select(count)
        .where('submissions.practicalId', 'in', practicalIds).executeTakeFirstOrThrow()
    : { n: 0 }
  const digests = practicalIds.length
    ? await db.selectFrom('digests').select(count).where('practicalId', 'in', practicalIds).executeTakeFirstOrThrow()
    : { n: 0 }
  const coOwners = await db.selectFrom('courseOwners').select(count).where('courseId', '=', course.id).executeTakeFirstOrThrow()
  const skipped = source.sections.reduce((n, s) => n + s.skippedDates.length, 0)
  return [
    { noun: 'enrolment', count: enrolments.n, note: 'students, their stations and invitations stay with the old term' },
    { noun: 'uploaded run', count: runs.n, note: 'with their files and results' },
    { noun: 'review', count: reviews.n, note: 'scores, comments and returns' },
    { noun: 'section digest', count: digests.n, note: 'the e-mails already sent' },
    { noun: 'skipped date', count: skipped, note: 'holidays differ from term to term: add the new ones to each section' },
    { noun: 'TA assignment', count: keepTas ? 0 : source.tas.length, note: 'assign TAs to the new sections, or choose to keep them' },
    { noun: 'co-owner', count: coOwners.n - 1, note: 'you own the copy; add co-owners to it afterwards' },
  ].filter((row) => row.count > 0)
}

function refuseEmptySections(source: Source, shift: TermShift) {
  const moved = new Map(shift.sections.map((s) => [s.id, s]))
  for (const section of source.sections) {
    const { firstDate, lastDate } = moved.get(section.id)!
    if (firstDate > lastDate) {
      const message = `Section ${section.code} would not meet before the term ends (its first date is ${displayDate(firstDate)})`
      invalid([{ field: 'end', message }])
    }
  }
}

function planOf(course: Course, input: CourseCopyFields, source: Source) {
  const shift = shiftTimetable(source.sections, source.sessions, input, course.timezone)
  refuseEmptySections(source, shift)
  return shift
}

function previewOf(course: Course, input: CourseCopyFields, source: Source, shift: TermShift,
  notCopied: CourseCopyPreview['notCopied']): CourseCopyPreview {
  const moved = new Map(shift.sections.map((s) => [s.id, s]))
  const codeOf = new Map(source.sections.map((s) => [s.id, s.code]))
  const sections = source.sections.map((s): CopiedSectionView => {
    const { firstDate, lastDate, shortened } = moved.get(s.id)!
    const meetings = sectionMeetings({ ...s, firstDate, lastDate, skippedDates: [], timezone: course.timezone }).length
    return {
      code: s.code, weekday: s.weekday, startTime: s.startTime, endTime: s.endTime, room: s.room, hoodStations: s.hoodStations,
      studentsPerStation: s.studentsPerStation, oldFirstDate: s.firstDate, oldLastDate: s.lastDate, firstDate, lastDate, meetings,
      shortened, tas: input.keepTas ? source.tas.filter((t) => t.sectionId === s.id).map((t) => t.name) : [],
    }
  })
  const practicals = source.practicals.map((p): CopiedPracticalView => ({
    title: p.title,
    substrate: p.substrateName,
    method: p.methodName,
    items: source.items.filter((i) => i.practicalId === p.id).length,
    sessions: shift.sessions.filter((s) => s.practicalId === p.id).map((s) => ({
      section: codeOf.get(s.sectionId)!, oldMeetingDate: s.oldMeetingDate, meetingDate: s.meetingDate, dueAt: s.dueAt.toISOString(),
    })),
    dropped: shift.dropped.filter((s) => s.practicalId === p.id)
      .map((s) => ({ section: codeOf.get(s.sectionId)!, meetingDate: s.meetingDate })),
  }))
  return {
    from: { id: course.id, code: course.code, title: course.title, term: course.term },
    term: input.term, start: input.start, end: input.end, timezone: course.timezone, weeks: shift.weeks,
    settings: { outlierTest: course.outlierTest, releasePolicy: course.releasePolicy, rubric: course.rubric.map((r) => r.label) },
    sections, practicals, notCopied, conflicts: [],
  }
}

async function refuseTakenTerm(db: Db, course: Course, term: string) {
  const clash = await db.selectFrom('courses').select('id').where('code', '=', course.code).where('term', '=', term).executeTakeFirst()
  if (clash) invalid([{ field: 'term', message: `${course.code} already exists for ${term}` }], 409)
}

/** Rooms and (kept) TAs the copy's sections would share with other sections at the same time. */
async function copyConflicts(db: Db, course: Course, input: CourseCopyFields, source: Source, shift: TermShift) {
  const moved = new Map(shift.sections.map((s) => [s.id, s]))
  const candidates = source.sections.map((s, i) => ({
    ...s, ...moved.get(s.id)!, id: -(i + 1), skippedDates: [], courseCode: `${course.code} (${input.term})`, timezone: course.timezone,
    taIds: input.keepTas ? source.tas.filter((t) => t.sectionId === s.id).map((t) => t.id) : [], enrolled: 0,
  }))
  return (await conflictsOfNewSections(candidates, db as Kysely<Database>)).map((c) => c.message)
}

/** The copy as it would be saved; writes nothing. */
export async function previewCourseCopy(db: Kysely<Database>, course: Course, input: CourseCopyFields): Promise<CourseCopyPreview> {
  await refuseTakenTerm(db, course, input.term)
  const source = await loadSource(db, course)
  const shift = planOf(course, input, source)
  const preview = previewOf(course, input, source, shift, await leftBehind(db, course, source, input.keepTas))
  return { ...preview, conflicts: await copyConflicts(db, course, input, source, shift) }
}

/** Writes the copy (course, owner, sections, practicals with items and sessions) and its audit row; returns the new course's id. */
export async function copyCourse(db: Kysely<Database>, actor: Actor, course: Course, input: CourseCopyFields) {
  return db.transaction().execute(async (trx) => {
    await refuseTakenTerm(trx, course, input.term)
    const source = await loadSource(trx, course)
    const shift = planOf(course, input, source)
    const { id: _id, createdAt: _c, updatedAt: _u, term: _t, createdBy: _b, rubric, ...settings } = course
    const created = await trx.insertInto('courses')
      .values({ ...settings, term: input.term, rubric: JSON.stringify(rubric), createdBy: actor.id })
      .returning('id').executeTakeFirstOrThrow()
    await trx.insertInto('courseOwners').values({ courseId: created.id, userId: actor.id }).execute()

    const moved = new Map(shift.sections.map((s) => [s.id, s]))
    const sectionIdOf = new Map<number, number>()
    for (const s of source.sections) {
      const { id, courseId: _course, createdAt: _sc, updatedAt: _su, ...pattern } = s
      const { firstDate, lastDate } = moved.get(id)!
      const row = await trx.insertInto('sections')
        .values({ ...pattern, courseId: created.id, firstDate, lastDate, skippedDates: [] }).returning('id').executeTakeFirstOrThrow()
      sectionIdOf.set(id, row.id)
    }
    const tas = input.keepTas ? source.tas.map((t) => ({ sectionId: sectionIdOf.get(t.sectionId)!, userId: t.id })) : []
    if (tas.length) await trx.insertInto('sectionTas').values(tas).execute()

    const practicalIdOf = new Map<number, number>()
    for (const p of source.practicals) {
      const { title, substrateId, methodId, workUnit, notes } = p
      const row = await trx.insertInto('practicals').values({ courseId: created.id, title, substrateId, methodId, workUnit, notes })
        .returning('id').executeTakeFirstOrThrow()
      practicalIdOf.set(p.id, row.id)
    }
    const items = source.items.map(({ id: _i, practicalId, ...item }) => ({ ...item, practicalId: practicalIdOf.get(practicalId)! }))
    if (items.length) await trx.insertInto('practicalItems').values(items).execute()
    const sessions = shift.sessions.map((s) => ({
      practicalId: practicalIdOf.get(s.practicalId)!, sectionId: sectionIdOf.get(s.sectionId)!, meetingDate: s.meetingDate, dueAt: s.dueAt,
    }))
    if (sessions.length) await trx.insertInto('practicalSessions').values(sessions).execute()

    await audit(trx, actor, {
      action: 'course.copy', entity: 'course', entityId: created.id,
      before: { courseId: course.id, term: course.term },
      after: {
        term: input.term, start: input.start, end: input.end, keepTas: input.keepTas, weeks: shift.weeks,
        sections: sectionIdOf.size, practicals: practicalIdOf.size, items: items.length, sessions: sessions.length,
        droppedSessions: shift.dropped.length, taAssignments: tas.length,
      },
    })
    return { id: created.id }
  })
}
