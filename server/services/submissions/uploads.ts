import { sql } from 'kysely'
import type { Kysely } from 'kysely'
import type { PracticalScope } from '../../utils/access'
import type { UploadedFile } from '../../utils/files'
import type { Database, Submission } from '../../database/schema'
import type { KeyFactor } from '#shared/utils/key-factor'
import type { FlagView, StoredResult, SubmissionCreated, SubmissionPreview } from '#shared/types/submission'
import { attentionOf, RunInputError, type PracticalChemistry, type RunResult } from '#shared/utils/submission'
import { unitAndLatest, type StudentWorkUnit, type UploadColumns } from './student-unit'
import { storedResultOf } from './stored-result'
import { createError } from 'h3'
import { expectationView, sharedChemistryOf, type ChemistryRow } from './practical-chemistry'
import type { Actor } from '../../utils/audit'
import { runEngine } from '../../utils/engines'
import { compiledOnce } from '../../utils/db'
import { asUploadFormatError } from '../../utils/files'
import { noTiming, type RequestTiming } from '../../utils/server-timing'

type UploadTask = 'evaluateUpload' | 'evaluateUploadToStore'

/**
 * The practical's chemistry for an upload, from the row the access statement read
 * (uploadColumns): the engine gets its own copy, and nothing here changes it. 409 while the
 * practical has no retention windows.
 */
async function uploadChemistry(row: ChemistryRow): Promise<PracticalChemistry> {
  const chemistry = await sharedChemistryOf(row)
  if (!chemistry.windows.length) {
    throw createError({ statusCode: 409, statusMessage: 'This practical has no retention windows yet; ask your instructor to set them' })
  }
  return chemistry
}

/**
 * An upload's engine task with the practical's chemistry; the refusals computeRun describes.
 * `timing` hears the task's own time in the worker ("worker").
 */
async function runUploadTask<K extends UploadTask>(
  file: UploadedFile, task: K, chemistryRead: Promise<PracticalChemistry>, timing = noTiming,
) {
  const chemistry = await chemistryRead
  try {
    const bytes = new Uint8Array(file.bytes)
    const onTime = (ms: number) => timing.add('worker', ms, 'the engine task alone')
    const output = await runEngine(task, { bytes, chemistry }, { field: 'file', transfer: [bytes.buffer], onTime })
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
export function computeRun(file: UploadedFile, chemistryRow: ChemistryRow) {
  return runUploadTask(file, 'evaluateUpload', uploadChemistry(chemistryRow))
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
): Promise<CreatedRow> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await insertVersion(db, actor, v)
    } catch (error) {
      if (!isVersionTaken(error) || attempt >= 5) throw error
    }
  }
}

type CreatedRow = Pick<Submission, (typeof CREATED_COLUMNS)[number]>

// Built and compiled once, sent as a prepared statement (compiledOnce): PostgreSQL parsed and
// planned this five-insert statement on every upload. The members go in as one array.
const insertVersionStatement = compiledOnce((db, _shape: 'version',
  sha256: string, byteSize: number, mediaType: string, originalName: string, content: Buffer, actorId: number,
  practicalId: number, sectionId: number, unitKey: string, inputKind: string, peaks: Buffer, result: string, flags: string,
  attention: number, factorSecondary: number | null, factorTertiary: number | null, late: boolean, idempotencyKey: string | null,
  memberIds: number[], after: string, ip: string | null) => db
  .with('file', (q) => q.insertInto('files')
    .values({ sha256, byteSize, mediaType, originalName, content, uploadedBy: actorId }).returning('id'))
  .with('created', (q) => q.insertInto('submissions').values((eb) => ({
    practicalId,
    sectionId,
    unitKey,
    version: eb.selectFrom('submissions').select(sql<number>`coalesce(max(version), 0) + 1`.as('next'))
      .where('practicalId', '=', practicalId).where('unitKey', '=', unitKey),
    fileId: eb.selectFrom('file').select('id'),
    inputKind: inputKind as Submission['inputKind'],
    sha256,
    peaks,
    result,
    flags,
    attention,
    factorSecondary,
    factorTertiary,
    late,
    submittedBy: actorId,
    idempotencyKey,
  })).returning(CREATED_COLUMNS))
  .with('members', (q) => q.insertInto('submissionMembers').columns(['submissionId', 'userId'])
    .expression((eb) => eb.selectFrom('created').select(['created.id', sql<number>`unnest(${memberIds}::int[])`.as('userId')])))
  .with('audited', (q) => q.insertInto('auditLog').values((eb) => ({
    actorId,
    action: 'submission.create',
    entity: 'submission',
    entityId: eb.selectFrom('created').select(sql<string>`id::text`.as('id')),
    after: eb.selectFrom('created').select(sql<string>`jsonb_set(${after}::jsonb, '{version}', to_jsonb(version))`.as('after')),
    ip,
  })))
  .selectFrom('created').select(CREATED_COLUMNS))

async function insertVersion(db: Kysely<Database>, actor: Actor, v: NewVersion): Promise<CreatedRow> {
  const after = { practicalId: v.practicalId, unitKey: v.unit.unitKey, sha256: v.file.sha256, fileName: v.file.name, late: v.late }
  const [row] = await insertVersionStatement(db, 'version',
    v.file.sha256, v.file.bytes.length, v.mediaType, v.file.name, v.file.bytes, actor.id,
    v.practicalId, v.unit.sectionId, v.unit.unitKey, v.run.kind,
    Buffer.from(v.storedPeaks.buffer, v.storedPeaks.byteOffset, v.storedPeaks.byteLength),
    JSON.stringify(storedResultOf(v.run, v.keyFactor)), JSON.stringify(v.run.flags), attentionOf(v.run.flags),
    v.run.factors.secondaryToPrimary, v.run.factors.tertiaryToPrimary, v.late, v.idempotencyKey,
    v.unit.memberIds, JSON.stringify(after), actor.ip)
  return row!
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

/**
 * A student's upload: a repeated Idempotency-Key returns the first answer; the same file as the
 * latest version is recognised (200 with identicalTo) and stores nothing; else a new version.
 * `upload` is the file as it arrives: the practical's chemistry and an earlier answer to the key
 * are read meanwhile, and the file's own refusals (400, 413) still come first. `read` is what the
 * access statement brought (uploadColumns): the chemistry row and the caller's enrolment.
 * `timing` records the engine, the unit's statement and the store (Server-Timing).
 */
export async function createSubmission(
  db: Kysely<Database>, actor: Actor, scope: PracticalScope, upload: Promise<UploadedFile>, idempotencyKey: string | null,
  read: UploadColumns, timing: RequestTiming = noTiming,
): Promise<{ status: number, body: SubmissionCreated }> {
  const chemistryRead = uploadChemistry(read.chemistry)
  const earlierRead = earlierAnswer(db, actor.id, scope.practical.id, idempotencyKey)
  for (const pending of [chemistryRead, earlierRead]) pending.catch(() => {})
  const file = await upload
  const earlier = await earlierRead
  if (earlier) return earlier
  // The engine reads the file (and packs its peaks for storing) while the unit and its newest
  // version are looked up (once the file is here: the newest then is the one to compare with);
  // the unit's own refusal (not enrolled) still comes first.
  const computing = timing.span('engine', runUploadTask(file, 'evaluateUploadToStore', chemistryRead, timing))
  computing.catch(() => {})
  const { unit, latest } = await timing.span('unit', unitAndLatest(db, scope, read.enrolment))
  const { run, storedPeaks, chemistry, mediaType } = await computing
  if (latest && latest.sha256 === file.sha256) return { status: 200, body: { ...toCreated(latest), identicalTo: latest.id } }
  const late = unit.uploadDueAt !== null && Date.now() > unit.uploadDueAt.getTime()
  try {
    const row = await timing.span('store', storeSubmissionVersion(db, actor, {
      practicalId: scope.practical.id, unit, file, mediaType, run, storedPeaks, keyFactor: chemistry.keyFactor, late, idempotencyKey,
    }))
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
