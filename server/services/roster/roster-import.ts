import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../../database/schema'
import type { MultipartUpload } from '../../utils/files'
import {
  checkRosterRows, mapRosterRecords, parseRosterCsv, rosterCapacityConflicts, rosterMappingProblems,
  RosterFileError, suggestRosterMapping, summarizeRosterRows, type CheckedRosterRow, type RosterAccount,
} from '#shared/utils/roster-csv'
import {
  rosterMappingSchema, type RosterConflictView, type RosterImportHistoryItem, type RosterMapping, type RosterSummary,
} from '#shared/types/roster'
import { toSafeCsv } from '#shared/utils/csv-safe'
import { uploadAsText } from '../../utils/files'
import { invalid } from '../../utils/validation'
import { invitationExpiry, issueInvitation, queueInvitationMail, type InvitingCourse } from './invitations'
import { createError } from 'h3'

// Roster import: the file is read and every row checked against the course as it is now (the
// import does it again inside its transaction, so a stale preview never decides anything).

type Db = Kysely<Database> | Transaction<Database>

export interface RosterPlan {
  fileName: string
  columns: string[]
  mapping: RosterMapping
  mappingIssues: Array<{ field: string, message: string }>
  rows: CheckedRosterRow[]
  summary: RosterSummary
  conflicts: RosterConflictView[]
}

/** The course's sections with their active head-count, for checks and capacity. */
export async function rosterSections(db: Db, courseId: number) {
  return db.selectFrom('sections')
    .select((eb) => ['sections.id', 'sections.code', 'sections.hoodStations', 'sections.studentsPerStation',
      eb.selectFrom('enrollments').select((e) => e.fn.countAll<number>().as('n'))
        .whereRef('enrollments.sectionId', '=', 'sections.id').where('enrollments.status', '=', 'active').as('enrolled')])
    .where('sections.courseId', '=', courseId).orderBy('sections.code').execute()
    .then((rows) => rows.map((r) => ({ ...r, enrolled: Number(r.enrolled ?? 0) })))
}

async function rosterAccounts(db: Db, courseId: number, emails: string[]): Promise<Map<string, RosterAccount>> {
  const accounts = new Map<string, RosterAccount>()
  if (!emails.length) return accounts
  const rows = await db.selectFrom('users')
    .leftJoin('enrollments', (j) => j.onRef('enrollments.userId', '=', 'users.id')
      .on('enrollments.courseId', '=', courseId).on('enrollments.status', '=', 'active'))
    .select(['users.id', 'users.email', 'users.role', 'enrollments.sectionId', 'enrollments.studentId'])
    .where('users.email', 'in', emails).execute()
  for (const r of rows) {
    accounts.set(r.email, { userId: r.id, role: r.role, activeSectionId: r.sectionId ?? null, activeStudentId: r.studentId ?? null })
  }
  return accounts
}

async function rosterStudentIds(db: Db, courseId: number): Promise<Map<string, number>> {
  const rows = await db.selectFrom('enrollments').select(['studentId', 'userId'])
    .where('courseId', '=', courseId).where('status', '=', 'active').where('studentId', 'is not', null).execute()
  return new Map(rows.map((r) => [r.studentId!, r.userId]))
}

function mappingOverride(raw: string | undefined): Partial<RosterMapping> {
  if (!raw) return {}
  let parsed: unknown
  try {
    parsed = JSON.parse(raw)
  } catch {
    throw createError({ statusCode: 400, statusMessage: 'mapping: send the column mapping as JSON' })
  }
  const result = rosterMappingSchema.safeParse(parsed)
  if (!result.success) invalid(result.error.issues.map((i) => ({ field: `mapping.${i.path.join('.')}`, message: i.message })))
  return Object.fromEntries(Object.entries(result.data).filter(([, v]) => v !== undefined))
}

/** Reads, maps and checks an uploaded roster file against the course. Writes nothing. */
export async function planRosterImport(db: Db, courseId: number, upload: MultipartUpload): Promise<RosterPlan> {
  const text = uploadAsText(upload.file)
  let parsed: ReturnType<typeof parseRosterCsv>
  try {
    parsed = parseRosterCsv(text)
  } catch (error) {
    if (error instanceof RosterFileError) throw createError({ statusCode: 422, statusMessage: `file: ${error.message}` })
    throw error
  }
  const mapping = { ...suggestRosterMapping(parsed.columns), ...mappingOverride(upload.fields.mapping) }
  const mappingIssues = rosterMappingProblems(mapping, parsed.columns).map((p) => ({ field: `mapping.${p.field}`, message: p.message }))
  const base = { fileName: upload.file.name, columns: parsed.columns, mapping, mappingIssues }
  if (mappingIssues.length) return { ...base, rows: [], summary: summarizeRosterRows([]), conflicts: [] }

  const mapped = mapRosterRecords(parsed, mapping)
  const sections = await rosterSections(db, courseId)
  const accounts = await rosterAccounts(db, courseId, [...new Set(mapped.map((r) => r.email).filter(Boolean))])
  const rows = checkRosterRows(mapped, { sections, accounts, studentIds: await rosterStudentIds(db, courseId) })
  return { ...base, rows, summary: summarizeRosterRows(rows), conflicts: rosterCapacityConflicts(sections, rows) }
}

/** The preview's rows without the internal ids. */
export function rosterPreviewRows(rows: CheckedRosterRow[]) {
  return rows.map(({ sectionId: _s, userId: _u, ...row }) => row)
}

/** Who adds students to which course; `appUrl` starts the invitation links. */
export interface RosterWriteContext {
  course: InvitingCourse
  me: { id: number, name: string }
  appUrl: string
}

/** The e-mails whose changed student id the instructor confirmed (a JSON list in the upload's fields). */
export function confirmedIdChanges(raw: string | undefined): Set<string> {
  if (!raw) return new Set()
  let parsed: unknown
  try {
    parsed = JSON.parse(raw)
  } catch {
    throw createError({ statusCode: 400, statusMessage: 'replaceStudentIds: send the confirmed e-mails as a JSON list' })
  }
  if (!Array.isArray(parsed) || !parsed.every((e) => typeof e === 'string')) {
    throw createError({ statusCode: 400, statusMessage: 'replaceStudentIds: send the confirmed e-mails as a JSON list' })
  }
  return new Set(parsed.map((e) => e.trim().toLowerCase()))
}

/**
 * Creates accounts, enrolments, moves and invitations for the rows of a clean plan. A student
 * already in the course gets the file's id when they have none; a different id replaces theirs
 * only when its e-mail is in `replaceIds` (the instructor confirmed that change).
 */
export async function writeRosterRows(
  trx: Transaction<Database>, ctx: RosterWriteContext, rows: CheckedRosterRow[], replaceIds: Set<string> = new Set(),
) {
  const fresh = rows.filter((r) => r.outcome === 'new')
  const created = fresh.length
    ? await trx.insertInto('users')
        .values(fresh.map((r) => ({ email: r.email, name: r.name, role: 'student' as const, passwordHash: null })))
        .returning(['id', 'email']).execute()
    : []
  const idOf = new Map(created.map((u) => [u.email, u.id]))
  const enrolling = rows.filter((r) => r.outcome === 'new' || r.outcome === 'enrol')
  if (enrolling.length) {
    await trx.insertInto('enrollments').values(enrolling.map((r) => ({
      courseId: ctx.course.id, sectionId: r.sectionId!, userId: r.userId ?? idOf.get(r.email)!, studentId: r.studentId || null,
    }))).execute()
  }
  const moves = rows.filter((x) => x.outcome === 'move')
  for (const r of moves) {
    await trx.updateTable('enrollments').set({ sectionId: r.sectionId!, station: null, seat: null })
      .where('courseId', '=', ctx.course.id).where('userId', '=', r.userId!).where('status', '=', 'active').execute()
  }
  const idRows = rows.filter((r) => r.studentIdChange === 'added' || (r.studentIdChange === 'changed' && replaceIds.has(r.email)))
  // Confirmed replacements let go of their old ids first, so two students may swap theirs.
  const replacing = idRows.filter((r) => r.studentIdChange === 'changed').map((r) => r.userId!)
  if (replacing.length) {
    await trx.updateTable('enrollments').set({ studentId: null })
      .where('courseId', '=', ctx.course.id).where('userId', 'in', replacing).where('status', '=', 'active').execute()
  }
  for (const r of idRows) {
    await trx.updateTable('enrollments').set({ studentId: r.studentId })
      .where('courseId', '=', ctx.course.id).where('userId', '=', r.userId!).where('status', '=', 'active')
      .where('studentId', 'is', null).execute()
  }
  const toInvite = [
    ...fresh.map((r) => ({ userId: idOf.get(r.email)!, email: r.email, name: r.name })),
    ...await uninvitedAccounts(trx, rows.filter((r) => r.outcome === 'enrol').map((r) => r.userId!)),
  ]
  for (const person of toInvite) await inviteToCourse(trx, ctx, person)
  return {
    invited: toInvite.length,
    moved: moves.map((r) => ({ userId: r.userId!, from: r.fromSectionCode ?? null, to: r.sectionCode })),
    idsReplaced: replacing.length,
    idsKept: rows.filter((r) => r.studentIdChange === 'changed').length - replacing.length,
  }
}

/** Existing accounts that have not joined (no password, no campus sign-in) and hold no open invitation. */
async function uninvitedAccounts(db: Db, userIds: number[]) {
  if (!userIds.length) return []
  return db.selectFrom('users').select(['id as userId', 'email', 'name'])
    .where('id', 'in', userIds).where('passwordHash', 'is', null).where('campusJoinedAt', 'is', null)
    .where((eb) => eb.not(eb.exists(eb.selectFrom('invitations').select('invitations.id')
      .whereRef('invitations.userId', '=', 'users.id').where('invitations.usedAt', 'is', null)
      .where('invitations.expiresAt', '>', new Date()))))
    .execute()
}

/** A fresh link to one person, lasting into the course's term, and its e-mail (`key`: a resend round's). */
export async function inviteToCourse(
  trx: Db, ctx: RosterWriteContext, person: { userId: number, email: string, name: string },
  options: { role?: 'student' | 'ta', key?: string } = {},
) {
  const invitation = await issueInvitation(trx, person.userId, ctx.me.id, await invitationExpiry(trx, ctx.course))
  await queueInvitationMail(trx, {
    invitation,
    to: { email: person.email, name: person.name },
    course: ctx.course,
    role: options.role ?? 'student',
    key: options.key,
    invitedBy: ctx.me.name,
    createdBy: ctx.me.id,
    appUrl: ctx.appUrl,
  })
  return invitation
}

/** A unique index tripped by a concurrent change: ask the person to look again, not a 500. */
export async function withRosterRace<T>(work: () => Promise<T>, message: string): Promise<T> {
  try {
    return await work()
  } catch (error) {
    if ((error as { code?: string }).code === '23505') throw createError({ statusCode: 409, statusMessage: message })
    throw error
  }
}

/** 409 with the capacity conflicts unless the caller confirmed them. */
export function refuseOverCapacity(conflicts: RosterConflictView[], confirmed: boolean) {
  if (conflicts.length && !confirmed) {
    throw createError({ statusCode: 409, statusMessage: conflicts[0]!.message, data: { conflicts } })
  }
}

// Imports recorded before student ids were counted say nothing of them.
const NO_ID_COUNTS = { idsAdded: 0, idsChanged: 0 }

/** The course's last 100 roster imports, newest first, with who uploaded which file. */
export async function rosterImportHistory(db: Db, courseId: number): Promise<RosterImportHistoryItem[]> {
  const rows = await db.selectFrom('rosterImports')
    .innerJoin('files', 'files.id', 'rosterImports.fileId')
    .leftJoin('users', 'users.id', 'rosterImports.createdBy')
    .select(['rosterImports.id', 'rosterImports.createdAt', 'rosterImports.summary', 'rosterImports.skipped', 'files.originalName',
      'users.name'])
    .where('rosterImports.courseId', '=', courseId)
    .orderBy('rosterImports.createdAt', 'desc').orderBy('rosterImports.id', 'desc')
    .limit(100).execute()
  return rows.map((r) => ({
    id: r.id,
    createdAt: r.createdAt.toISOString(),
    by: r.name,
    fileName: r.originalName,
    summary: { ...NO_ID_COUNTS, ...r.summary },
    skipped: r.skipped,
  }))
}

/** One import's skipped rows as CSV (404 when the import is not this course's). */
export async function skippedRowsCsv(db: Db, courseId: number, importId: number): Promise<string> {
  const record = await db.selectFrom('rosterImports').select('skipped')
    .where('id', '=', importId).where('courseId', '=', courseId).executeTakeFirst()
  if (!record) throw createError({ statusCode: 404, statusMessage: 'No such roster import in this course' })
  return toSafeCsv(['Row', 'Student ID', 'Name', 'E-mail', 'Section', 'Reason'],
    record.skipped.map((r) => [r.row, r.studentId, r.name, r.email, r.sectionCode, r.reasons.join('; ')]))
}
