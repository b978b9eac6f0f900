import { sql } from 'kysely'
import type { Kysely } from 'kysely'
import type { PracticalScope } from '../../utils/access'
import type { UploadedFile } from '../../utils/files'
import type { Database, Submission } from '../../database/schema'
import type { KeyFactor } from '#shared/utils/key-factor'
import type { FlagView, StoredResult, SubmissionCreated, SubmissionPreview } from '#shared/types/submission'
import { attentionOf, RunInputError, type PracticalChemistry, type RunResult } from '#shared/utils/submission'
import { stationOfUnitKey, unitKeyOf } from './work-units'
import { storedResultOf } from './stored-result'
import { createError } from 'h3'
import { expectationView, practicalChemistry } from './practical-chemistry'
import type { Actor } from '../../utils/audit'
import { runEngine } from '../../utils/engines'
import { asUploadFormatError } from '../../utils/files'
import { stationMates } from '../roster'
import { uploadDueAt } from '#shared/utils/resubmit'

export interface StudentWorkUnit {
  sectionId: number
  unitKey: string
  /** Everyone the result counts for: the student, and their station partner(s) for pair work. */
  memberIds: number[]
  dueAt: Date | null
  /** What a new upload's late mark is judged against: the section's due time, or a return's later one. */
  uploadDueAt: Date | null
  /** The day the caller's section runs the practical ('YYYY-MM-DD'). */
  meetingDate: string | null
}

/** The newest decision on any version of a work unit: a return's due time holds until a later accept. */
function lastUnitDecision(db: Kysely<Database>, practicalId: number, unitKey: string) {
  return db.selectFrom('reviews').innerJoin('submissions', 'submissions.id', 'reviews.submissionId')
    .select(['reviews.decision', 'reviews.resubmitDueAt'])
    .where('submissions.practicalId', '=', practicalId).where('submissions.unitKey', '=', unitKey)
    .orderBy('reviews.createdAt', 'desc').orderBy('reviews.id', 'desc').limit(1).executeTakeFirst()
}

/** The caller's own work unit for a practical: 404 unless they are a student in a section that runs it. */
export async function studentUnit(db: Kysely<Database>, scope: PracticalScope): Promise<StudentWorkUnit> {
  if (scope.role !== 'student') throw createError({ statusCode: 403, statusMessage: 'Only students upload results' })
  const enrollment = await db.selectFrom('enrollments').select(['sectionId', 'station'])
    .where('userId', '=', scope.me.id).where('status', '=', 'active')
    .where('sectionId', 'in', scope.sessionSectionIds.length ? scope.sessionSectionIds : [-1])
    .executeTakeFirst()
  if (!enrollment) throw createError({ statusCode: 404, statusMessage: 'Practical not found' })
  const student = { userId: scope.me.id, sectionId: enrollment.sectionId, station: enrollment.station }
  const unitKey = unitKeyOf(scope.practical.workUnit, student)
  // Three reads that need only the enrolment, side by side: an upload waits for each round trip.
  const [session, partners, last] = await Promise.all([
    db.selectFrom('practicalSessions').select(['dueAt', 'meetingDate'])
      .where('practicalId', '=', scope.practical.id).where('sectionId', '=', enrollment.sectionId).executeTakeFirst(),
    stationOfUnitKey(unitKey) === null ? [] : stationMates(db, enrollment.sectionId, enrollment.station!),
    lastUnitDecision(db, scope.practical.id, unitKey),
  ])
  return {
    sectionId: enrollment.sectionId,
    unitKey,
    memberIds: [...new Set([scope.me.id, ...partners.map((p) => p.userId)])],
    dueAt: session?.dueAt ?? null,
    uploadDueAt: uploadDueAt(session?.dueAt ?? null, last),
    meetingDate: session?.meetingDate ?? null,
  }
}

type UploadTask = 'evaluateUpload' | 'evaluateUploadToStore'

/** The practical's chemistry for an upload; 409 while it has no retention windows. */
async function uploadChemistry(scope: PracticalScope): Promise<PracticalChemistry> {
  const chemistry = await practicalChemistry(scope.practical)
  if (!chemistry.windows.length) {
    throw createError({ statusCode: 409, statusMessage: 'This practical has no retention windows yet; ask your instructor to set them' })
  }
  return chemistry
}

/** An upload's engine task with the practical's chemistry (read here unless given); the refusals computeRun describes. */
async function runUploadTask<K extends UploadTask>(
  scope: PracticalScope, file: UploadedFile, task: K, chemistryRead: Promise<PracticalChemistry> = uploadChemistry(scope),
) {
  const chemistry = await chemistryRead
  try {
    const bytes = new Uint8Array(file.bytes)
    const output = await runEngine(task, { bytes, chemistry }, { field: 'file', transfer: [bytes.buffer] })
    return { ...output, chemistry }
  } catch (error) {
    if (error instanceof RunInputError) {
      throw createError({ statusCode: 422, statusMessage: `file: ${error.message}`, data: { rows: error.rows.slice(0, 50) } })
    }
    throw asUploadFormatError(error)
  }
}

/**
 * Runs the engines on an uploaded file (text, .xlsx or ANDI/AIA netCDF, judged by its bytes) in
 * the engine worker; an unreadable file is a 415 or a 422 naming its rows. `mediaType` is what
 * the original is kept as.
 */
export function computeRun(scope: PracticalScope, file: UploadedFile) {
  return runUploadTask(scope, file, 'evaluateUpload')
}

// A version's row without its peaks: an upload's answer never shows them, and reading them back
// (thousands for a long table) only to drop them cost more than storing them.
const CREATED_COLUMNS = [
  'id', 'practicalId', 'sectionId', 'unitKey', 'version', 'fileId', 'inputKind', 'sha256', 'result', 'flags', 'attention',
  'factorSecondary', 'factorTertiary', 'status', 'late', 'submittedBy', 'idempotencyKey', 'excludedAt', 'excludedBy',
  'exclusionReason', 'createdAt', 'updatedAt',
] as const satisfies ReadonlyArray<Exclude<keyof Submission, 'peaks'>>

export function toCreated(
  row: Pick<Submission, 'id' | 'version' | 'status' | 'result' | 'flags' | 'late' | 'inputKind'>,
): SubmissionCreated {
  const result = row.result as StoredResult
  return {
    id: row.id,
    version: row.version,
    status: row.status,
    result: { molePercents: result.molePercents, factors: result.factors },
    flags: row.flags as FlagView[],
    late: row.late,
    kind: row.inputKind,
  }
}

export function previewOf(run: RunResult, chemistry: PracticalChemistry, late: boolean): SubmissionPreview {
  return {
    kind: run.kind,
    molePercents: run.molePercents,
    factors: run.factors,
    peaks: run.peaks,
    flags: run.flags,
    relative: run.relative,
    conversion: run.conversion,
    unassignedPercent: run.unassignedPercent,
    warnings: run.warnings,
    predicted: chemistry.predicted,
    statistical: chemistry.statistical,
    products: chemistry.products,
    expected: expectationView(chemistry),
    productKind: chemistry.productKind,
    late,
  }
}

async function byIdempotencyKey(db: Kysely<Database>, userId: number, key: string) {
  return db.selectFrom('submissions').select(CREATED_COLUMNS)
    .where('submittedBy', '=', userId).where('idempotencyKey', '=', key).executeTakeFirst()
}

const UNIQUE_VIOLATION = '23505'

/** What a new version is made of: the unit it counts for, the file, and what the engines made of it. */
export interface NewVersion {
  practicalId: number
  unit: Pick<StudentWorkUnit, 'sectionId' | 'unitKey' | 'memberIds'>
  file: UploadedFile
  /** What the original is kept as (text/plain, a workbook, netCDF). */
  mediaType: string
  run: Omit<RunResult, 'peaks'>
  /** The run's peaks, packed (packPeaks). */
  storedPeaks: Uint8Array
  keyFactor: KeyFactor
  late: boolean
  idempotencyKey: string | null
}

/** Another upload of the same work unit took the version number first. */
const isVersionTaken = (error: unknown) =>
  (error as { code?: string }).code === UNIQUE_VIOLATION && (error as { constraint?: string }).constraint === 'submissions_unit_version'

/**
 * Stores the next version of a work unit in one statement, so one round trip and one commit: the
 * original bytes, the packed peaks and the computed result, the unit's members and the audit row
 * land together or not at all. The version is the unit's highest plus one; when a partner's
 * upload of the same unit commits that number first, the unique (practical, unit, version)
 * refuses this one and it is stored again as the next, so two uploads at once get n and n + 1.
 */
export async function storeSubmissionVersion(
  db: Kysely<Database>, actor: Actor, v: NewVersion,
): Promise<Pick<Submission, (typeof CREATED_COLUMNS)[number]>> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await insertVersion(db, actor, v)
    } catch (error) {
      if (!isVersionTaken(error) || attempt >= 5) throw error
    }
  }
}

function insertVersion(db: Kysely<Database>, actor: Actor, v: NewVersion) {
  const after = { practicalId: v.practicalId, unitKey: v.unit.unitKey, sha256: v.file.sha256, fileName: v.file.name, late: v.late }
  return db
    .with('file', (q) => q.insertInto('files').values({
      sha256: v.file.sha256,
      byteSize: v.file.bytes.length,
      mediaType: v.mediaType,
      originalName: v.file.name,
      content: v.file.bytes,
      uploadedBy: actor.id,
    }).returning('id'))
    .with('created', (q) => q.insertInto('submissions').values((eb) => ({
      practicalId: v.practicalId,
      sectionId: v.unit.sectionId,
      unitKey: v.unit.unitKey,
      version: eb.selectFrom('submissions').select(sql<number>`coalesce(max(version), 0) + 1`.as('next'))
        .where('practicalId', '=', v.practicalId).where('unitKey', '=', v.unit.unitKey),
      fileId: eb.selectFrom('file').select('id'),
      inputKind: v.run.kind,
      sha256: v.file.sha256,
      peaks: Buffer.from(v.storedPeaks.buffer, v.storedPeaks.byteOffset, v.storedPeaks.byteLength),
      result: JSON.stringify(storedResultOf(v.run, v.keyFactor)),
      flags: JSON.stringify(v.run.flags),
      attention: attentionOf(v.run.flags),
      factorSecondary: v.run.factors.secondaryToPrimary,
      factorTertiary: v.run.factors.tertiaryToPrimary,
      late: v.late,
      submittedBy: actor.id,
      idempotencyKey: v.idempotencyKey,
    })).returning(CREATED_COLUMNS))
    .with('members', (q) => q.insertInto('submissionMembers')
      .values((eb) => v.unit.memberIds.map((userId) => ({ submissionId: eb.selectFrom('created').select('id'), userId }))))
    .with('audited', (q) => q.insertInto('auditLog').values((eb) => ({
      actorId: actor.id,
      action: 'submission.create',
      entity: 'submission',
      entityId: eb.selectFrom('created').select(sql<string>`id::text`.as('id')),
      after: eb.selectFrom('created')
        .select(sql<string>`jsonb_set(${JSON.stringify(after)}::jsonb, '{version}', to_jsonb(version))`.as('after')),
      ip: actor.ip,
    })))
    .selectFrom('created').select(CREATED_COLUMNS)
    .executeTakeFirstOrThrow()
}

/** The first answer to a repeated Idempotency-Key, or null for a new key; 409 when it was for another practical. */
async function earlierAnswer(db: Kysely<Database>, userId: number, practicalId: number, key: string | null) {
  if (!key) return null
  const earlier = await byIdempotencyKey(db, userId, key)
  if (earlier && earlier.practicalId !== practicalId) {
    throw createError({ statusCode: 409, statusMessage: 'This Idempotency-Key was already used for another practical' })
  }
  return earlier ? { status: 201, body: toCreated(earlier) } : null
}

/** The newest version of a work unit, if any. */
function latestOfUnit(db: Kysely<Database>, practicalId: number, unitKey: string) {
  return db.selectFrom('submissions').select(CREATED_COLUMNS)
    .where('practicalId', '=', practicalId).where('unitKey', '=', unitKey)
    .orderBy('version', 'desc').limit(1).executeTakeFirst()
}

/**
 * A student's upload: a repeated Idempotency-Key returns the first answer; the same file as the
 * latest version is recognised (200 with identicalTo) and stores nothing; else a new version.
 * `upload` is the file as it arrives: the practical's chemistry, an earlier answer to the key and
 * the work unit are read meanwhile, and the file's own refusals (400, 413) still come first.
 */
export async function createSubmission(
  db: Kysely<Database>, actor: Actor, scope: PracticalScope, upload: Promise<UploadedFile>, idempotencyKey: string | null,
): Promise<{ status: number, body: SubmissionCreated }> {
  const chemistryRead = uploadChemistry(scope)
  const earlierRead = earlierAnswer(db, actor.id, scope.practical.id, idempotencyKey)
  const unitRead = studentUnit(db, scope)
  for (const read of [chemistryRead, earlierRead, unitRead]) read.catch(() => {})
  const file = await upload
  const earlier = await earlierRead
  if (earlier) return earlier
  // The engine reads the file (and packs its peaks for storing) while the unit and its latest
  // version are looked up; the unit's own refusal (not enrolled) still comes first.
  const computing = runUploadTask(scope, file, 'evaluateUploadToStore', chemistryRead)
  computing.catch(() => {})
  const unit = await unitRead
  const latestRead = latestOfUnit(db, scope.practical.id, unit.unitKey)
  latestRead.catch(() => {})
  const { run, storedPeaks, chemistry, mediaType } = await computing
  const latest = await latestRead
  if (latest && latest.sha256 === file.sha256) return { status: 200, body: { ...toCreated(latest), identicalTo: latest.id } }
  const late = unit.uploadDueAt !== null && Date.now() > unit.uploadDueAt.getTime()
  try {
    const row = await storeSubmissionVersion(db, actor, {
      practicalId: scope.practical.id, unit, file, mediaType, run, storedPeaks, keyFactor: chemistry.keyFactor, late, idempotencyKey,
    })
    return { status: 201, body: toCreated(row) }
  } catch (error) {
    // The same key sent twice at once: the loser of the race answers with the winner's row.
    if ((error as { code?: string }).code === UNIQUE_VIOLATION && !isVersionTaken(error) && idempotencyKey) {
      const winner = await byIdempotencyKey(db, actor.id, idempotencyKey)
      if (winner) return { status: 201, body: toCreated(winner) }
    }
    throw error
  }
}
