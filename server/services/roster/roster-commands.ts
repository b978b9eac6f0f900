import { createError } from 'h3'
import type { Kysely } from 'kysely'
import type { Database, Section } from '../../database/schema'
import { audit, type Actor } from '../../utils/audit'
import { storeFile, type MultipartUpload } from '../../utils/files'
import { invalid } from '../../utils/validation'
import type { EnrollmentAdded, RosterImportResult, RosterSkippedRow, SectionRosterView } from '#shared/types/roster'
import { planRosterImport, refuseOverCapacity, withRosterRace, writeRosterRows, inviteToCourse,
  type RosterWriteContext } from './roster-import'
import {
  loadSectionRoster, rosterActiveCount, rosterActiveStudents, rosterCapacityFor, rosterPlaceStudent, rosterStationPlaces,
  type EnrollmentInScope,
} from './section-roster'

// Changes to who is in a course and where they sit, each in one transaction with its audit row.
// The caller has checked that the actor manages the course or section. A unique index tripped by
// a concurrent change answers 409 (withRosterRace), never 500.

type Db = Kysely<Database>

/**
 * Every good row of the roster file, in one transaction: accounts, enrolments, moves, invitations
 * and their e-mails, the original file and the import record with the rows it skipped and why.
 * Every row is checked again inside the transaction, so a stale preview never decides anything;
 * a file with no good row is refused whole.
 */
export async function importRoster(
  db: Db, actor: Actor, ctx: RosterWriteContext, upload: MultipartUpload, confirmConflicts: boolean, replaceIds: Set<string> = new Set(),
) {
  return withRosterRace(() => db.transaction().execute(async (trx): Promise<RosterImportResult> => {
    const plan = await planRosterImport(trx, ctx.course.id, upload)
    if (plan.mappingIssues.length) invalid(plan.mappingIssues, 422)
    const bad = plan.rows.filter((r) => r.outcome === 'error')
    if (bad.length === plan.rows.length) {
      const rows = bad.flatMap((r) => r.errors.map((e) => ({ row: r.row, field: e.field, message: e.message })))
      const first = `Row ${rows[0]!.row}: ${rows[0]!.message}`
      throw createError({ statusCode: 422, statusMessage: `No row can be imported. ${first}`, data: { rows } })
    }
    refuseOverCapacity(plan.conflicts, confirmConflicts)

    const written = await writeRosterRows(trx, ctx, plan.rows.filter((r) => r.outcome !== 'error'), replaceIds)
    const { invited, moved, idsKept } = written
    const fileId = await storeFile(trx, upload.file, ctx.me.id, 'text/csv')
    const summary = { ...plan.summary, idsChanged: written.idsReplaced }
    const skipped: RosterSkippedRow[] = bad.map((r) => ({
      row: r.row, email: r.email, name: r.name, sectionCode: r.sectionCode, studentId: r.studentId, reasons: r.errors.map((e) => e.message),
    }))
    const row = await trx.insertInto('rosterImports').values({
      courseId: ctx.course.id, fileId, mapping: JSON.stringify(plan.mapping), summary: JSON.stringify(summary),
      skipped: JSON.stringify(skipped), createdBy: ctx.me.id,
    }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, actor, {
      action: 'roster.import', entity: 'course', entityId: ctx.course.id,
      after: {
        importId: row.id, fileId, fileName: upload.file.name, summary, invited, moved, idsKept,
        skippedRows: skipped.map((r) => r.row), conflictsConfirmed: plan.conflicts.map((c) => c.message),
      },
    })
    return { importId: row.id, summary, skipped, idsKept }
  }), 'The roster changed while importing. Preview the file again.')
}

export interface EnrollmentInput { email: string, name: string, confirmConflicts: boolean }

/** One student into one section: an existing student account is reused, a new person is invited. */
export async function addEnrollment(db: Db, actor: Actor, ctx: RosterWriteContext, section: Section, input: EnrollmentInput) {
  return withRosterRace(() => db.transaction().execute(async (trx): Promise<EnrollmentAdded> => {
    const user = await trx.selectFrom('users').select(['id', 'name', 'role', 'passwordHash']).where('email', '=', input.email)
      .executeTakeFirst()
    if (user && user.role !== 'student') invalid([{ field: 'email', message: 'This e-mail belongs to a staff account, not a student' }],
      422)
    const current = user && await trx.selectFrom('enrollments').innerJoin('sections', 'sections.id', 'enrollments.sectionId')
      .select(['enrollments.id', 'sections.code']).where('enrollments.userId', '=', user.id)
      .where('enrollments.courseId', '=', ctx.course.id).where('enrollments.status', '=', 'active').executeTakeFirst()
    if (current) {
      const where = current.code === section.code ? 'already in this section' : `already in section ${current.code}; move them instead`
      throw createError({ statusCode: 409, statusMessage: `This student is ${where}`, data: { enrollmentId: current.id } })
    }
    refuseOverCapacity(rosterCapacityFor(section, (await rosterActiveCount(trx, section.id)) + 1), input.confirmConflicts)

    const userId = user?.id ?? (await trx.insertInto('users')
      .values({ email: input.email, name: input.name, role: 'student', passwordHash: null })
      .returning('id').executeTakeFirstOrThrow()).id
    const enrollment = await trx.insertInto('enrollments').values({ courseId: ctx.course.id, sectionId: section.id, userId })
      .returning('id').executeTakeFirstOrThrow()
    const invite = !user || (user.passwordHash === null)
    if (invite) await inviteToCourse(trx, ctx, { userId, email: input.email, name: user?.name ?? input.name })
    await audit(trx, actor, {
      action: 'enrollment.add', entity: 'enrollment', entityId: enrollment.id,
      before: null, after: { userId, sectionId: section.id, newAccount: !user, invited: invite },
    })
    return { enrollmentId: enrollment.id, userId, invited: invite }
  }), 'This student was just added by someone else. Reload the roster.')
}

/** 409 for a withdrawn student: they are added again, not moved. */
export function refuseWithdrawn(e: Pick<EnrollmentInScope['enrollment'], 'status'>) {
  if (e.status !== 'active') throw createError({ statusCode: 409, statusMessage: 'This student has withdrawn; add them again instead' })
}

export interface PlaceInput { station?: number | null, seat?: number | null, confirmConflicts: boolean }

/**
 * Moves a student to `target` (a section of the same course, or their own) and to a station and
 * seat there, swapping with whoever sits in it. Without a station given, a move clears it and a
 * stay keeps it.
 */
export async function placeEnrollment(db: Db, actor: Actor, e: EnrollmentInScope['enrollment'], target: Section, input: PlaceInput) {
  refuseWithdrawn(e)
  if (target.courseId !== e.courseId) invalid([{ field: 'sectionId', message: 'Choose a section of the same course' }], 422)
  const staying = target.id === e.sectionId
  const station = input.station === undefined ? (staying ? e.station : null) : input.station
  const seat = input.seat === undefined ? (staying ? e.seat : null) : input.seat
  if (station !== null && station > target.hoodStations) {
    invalid([{ field: 'station', message: `${target.code} has ${target.hoodStations} hood stations` }], 422)
  }
  if (seat !== null && seat > target.studentsPerStation) {
    invalid([{ field: 'seat', message: `${target.code} has ${target.studentsPerStation} seats per station` }], 422)
  }
  return withRosterRace(() => db.transaction().execute(async (trx) => {
    let swapped: { swappedWith?: number } = {}
    if (!staying) {
      refuseOverCapacity(rosterCapacityFor(target, (await rosterActiveCount(trx, target.id)) + 1), input.confirmConflicts)
      await trx.updateTable('enrollments').set({ sectionId: target.id, station: null, seat: null }).where('id', '=', e.id).execute()
      if (station !== null) swapped = await rosterPlaceStudent(trx, { ...e, sectionId: target.id, station: null, seat: null }, station,
        seat)
    } else {
      swapped = await rosterPlaceStudent(trx, e, station, seat)
    }
    const after = { sectionId: target.id, station, seat, ...swapped }
    await audit(trx, actor, {
      action: staying ? 'enrollment.place' : 'enrollment.move', entity: 'enrollment', entityId: e.id,
      before: { sectionId: e.sectionId, station: e.station, seat: e.seat }, after,
    })
    return { id: e.id, ...after }
  }), 'Someone changed this roster meanwhile. Reload it and try again.')
}

/** Withdrawn, not deleted: the enrolment stays for the record, without a station. */
export async function withdrawEnrollment(db: Db, actor: Actor, e: EnrollmentInScope['enrollment']) {
  const gone = () => createError({ statusCode: 409, statusMessage: 'This student has already withdrawn' })
  if (e.status !== 'active') throw gone()
  const withdrawnAt = new Date()
  await db.transaction().execute(async (trx) => {
    const changed = await trx.updateTable('enrollments').set({ status: 'withdrawn', withdrawnAt, station: null, seat: null })
      .where('id', '=', e.id).where('status', '=', 'active').executeTakeFirst()
    if (!changed.numUpdatedRows) throw gone()
    await audit(trx, actor, {
      action: 'enrollment.withdraw', entity: 'enrollment', entityId: e.id,
      before: { status: e.status, sectionId: e.sectionId, station: e.station, seat: e.seat },
      after: { status: 'withdrawn', withdrawnAt: withdrawnAt.toISOString(), station: null, seat: null },
    })
  })
  return { id: e.id, status: 'withdrawn' as const, withdrawnAt: withdrawnAt.toISOString() }
}

/** Everyone active, in name order, onto stations 1, 2, ... with seats 1..students per station. */
export async function assignStations(db: Db, actor: Actor, section: Section) {
  return withRosterRace(() => db.transaction().execute(async (trx): Promise<SectionRosterView> => {
    const students = await rosterActiveStudents(trx, section.id)
    const places = rosterStationPlaces(students.length, section)
    if (!places) {
      const seats = section.hoodStations * section.studentsPerStation
      throw createError({ statusCode: 409,
        statusMessage: `${section.code} has ${students.length} students but ${seats} places at its hood stations` })
    }
    // Lift everyone first: the seat index allows one student per seat at every moment.
    await trx.updateTable('enrollments').set({ station: null, seat: null })
      .where('sectionId', '=', section.id).where('status', '=', 'active').execute()
    for (const [i, s] of students.entries()) {
      await trx.updateTable('enrollments').set(places[i]!).where('id', '=', s.id).execute()
    }
    await audit(trx, actor, {
      action: 'section.stations.assign', entity: 'section', entityId: section.id,
      before: students.map((s) => ({ id: s.id, station: s.station, seat: s.seat })),
      after: students.map((s, i) => ({ id: s.id, ...places[i]! })),
    })
    return loadSectionRoster(trx, section)
  }), 'The roster changed meanwhile. Try again.')
}
