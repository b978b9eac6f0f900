import { sql } from 'kysely'
import type { H3Event } from 'h3'
import type { PracticalScope } from './access'
import type { UploadedFile } from './files'
import type { Submission } from '../database/schema'
import type { FlagView, StoredResult, SubmissionCreated, SubmissionPreview } from '#shared/types/submission'
import { attentionOf, RunInputError, type RunResult } from '#shared/utils/submission'
import { stationOfUnitKey, unitKeyOf } from '../services/submissions/work-units'
import { stationMates } from '../services/roster'

export interface StudentWorkUnit {
  sectionId: number
  unitKey: string
  /** Everyone the result counts for: the student, and their station partner(s) for pair work. */
  memberIds: number[]
  dueAt: Date | null
  /** The day the caller's section runs the practical ('YYYY-MM-DD'). */
  meetingDate: string | null
}

/** The caller's own work unit for a practical: 404 unless they are a student in a section that runs it. */
export async function studentUnit(event: H3Event, scope: PracticalScope): Promise<StudentWorkUnit> {
  if (scope.role !== 'student') throw createError({ statusCode: 403, statusMessage: 'Only students upload results' })
  const db = useDb()
  const enrollment = await db.selectFrom('enrollments').select(['sectionId', 'station'])
    .where('userId', '=', scope.me.id).where('status', '=', 'active')
    .where('sectionId', 'in', scope.sessionSectionIds.length ? scope.sessionSectionIds : [-1])
    .executeTakeFirst()
  if (!enrollment) throw createError({ statusCode: 404, statusMessage: 'Practical not found' })
  const session = await db.selectFrom('practicalSessions').select(['dueAt', 'meetingDate'])
    .where('practicalId', '=', scope.practical.id).where('sectionId', '=', enrollment.sectionId).executeTakeFirst()
  const student = { userId: scope.me.id, sectionId: enrollment.sectionId, station: enrollment.station }
  const unitKey = unitKeyOf(scope.practical.workUnit, student)
  const partners = stationOfUnitKey(unitKey) === null ? [] : await stationMates(db, enrollment.sectionId, enrollment.station!)
  return {
    sectionId: enrollment.sectionId,
    unitKey,
    memberIds: [...new Set([scope.me.id, ...partners.map((p) => p.userId)])],
    dueAt: session?.dueAt ?? null,
    meetingDate: session?.meetingDate ?? null,
  }
}

/**
 * Runs the engines on an uploaded file (text, .xlsx or ANDI/AIA netCDF, judged by its bytes) in
 * the engine worker; an unreadable file is a 415 or a 422 naming its rows. `mediaType` is what
 * the original is kept as.
 */
export async function computeRun(scope: PracticalScope, file: UploadedFile): Promise<{ run: RunResult, chemistry: Awaited<ReturnType<typeof practicalChemistry>>, mediaType: string }> {
  const chemistry = await practicalChemistry(scope.practical)
  if (!chemistry.windows.length) {
    throw createError({ statusCode: 409, statusMessage: 'This practical has no retention windows yet; ask your instructor to set them' })
  }
  try {
    const bytes = new Uint8Array(file.bytes)
    const { run, mediaType } = await runEngine('evaluateUpload', { bytes, chemistry }, { field: 'file', transfer: [bytes.buffer] })
    return { run, chemistry, mediaType }
  } catch (error) {
    if (error instanceof RunInputError) {
      throw createError({ statusCode: 422, statusMessage: `file: ${error.message}`, data: { rows: error.rows.slice(0, 50) } })
    }
    throw asUploadFormatError(error)
  }
}

export function toCreated(row: Pick<Submission, 'id' | 'version' | 'status' | 'result' | 'flags' | 'late' | 'inputKind'>): SubmissionCreated {
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

export function previewOf(run: RunResult, chemistry: Awaited<ReturnType<typeof practicalChemistry>>, late: boolean): SubmissionPreview {
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

async function byIdempotencyKey(userId: number, key: string) {
  return useDb().selectFrom('submissions').selectAll().where('submittedBy', '=', userId).where('idempotencyKey', '=', key).executeTakeFirst()
}

const UNIQUE_VIOLATION = '23505'

/**
 * Stores a new version: the original bytes, the parsed peaks and the computed result, in one
 * transaction. A repeated Idempotency-Key returns the first answer; the same file as the latest
 * version is recognised and stores nothing.
 */
export async function createSubmission(event: H3Event, scope: PracticalScope, file: UploadedFile, idempotencyKey: string | null): Promise<{ status: number, body: SubmissionCreated }> {
  const me = scope.me
  if (idempotencyKey) {
    const earlier = await byIdempotencyKey(me.id, idempotencyKey)
    if (earlier && earlier.practicalId !== scope.practical.id) {
      throw createError({ statusCode: 409, statusMessage: 'This Idempotency-Key was already used for another practical' })
    }
    if (earlier) return { status: 201, body: toCreated(earlier) }
  }
  const unit = await studentUnit(event, scope)
  const { run, chemistry, mediaType } = await computeRun(scope, file)
  const db = useDb()
  const latest = await db.selectFrom('submissions').selectAll()
    .where('practicalId', '=', scope.practical.id).where('unitKey', '=', unit.unitKey)
    .orderBy('version', 'desc').limit(1).executeTakeFirst()
  if (latest && latest.sha256 === file.sha256) return { status: 200, body: { ...toCreated(latest), identicalTo: latest.id } }

  const late = unit.dueAt !== null && Date.now() > unit.dueAt.getTime()
  const result: StoredResult = {
    molePercents: run.molePercents,
    factors: run.factors,
    relative: run.relative,
    conversion: run.conversion,
    unassignedPercent: run.unassignedPercent,
    warnings: run.warnings,
    keyFactor: chemistry.keyFactor,
  }
  try {
    const row = await db.transaction().execute(async (trx) => {
      // One writer per work unit at a time, so two partners uploading at once get versions n and n+1.
      await sql`select pg_advisory_xact_lock(hashtext(${`submission:${scope.practical.id}:${unit.unitKey}`}))`.execute(trx)
      const { next } = await trx.selectFrom('submissions').select(sql<number>`coalesce(max(version), 0) + 1`.as('next'))
        .where('practicalId', '=', scope.practical.id).where('unitKey', '=', unit.unitKey).executeTakeFirstOrThrow()
      const fileId = await storeFile(trx, file, me.id, mediaType)
      const inserted = await trx.insertInto('submissions').values({
        practicalId: scope.practical.id,
        sectionId: unit.sectionId,
        unitKey: unit.unitKey,
        version: next,
        fileId,
        inputKind: run.kind,
        sha256: file.sha256,
        parsed: JSON.stringify(run.peaks),
        result: JSON.stringify(result),
        flags: JSON.stringify(run.flags),
        attention: attentionOf(run.flags),
        factorSecondary: run.factors.secondaryToPrimary,
        factorTertiary: run.factors.tertiaryToPrimary,
        late,
        submittedBy: me.id,
        idempotencyKey,
      }).returningAll().executeTakeFirstOrThrow()
      await trx.insertInto('submissionMembers').values(unit.memberIds.map((userId) => ({ submissionId: inserted.id, userId }))).execute()
      await audit(trx, event, {
        action: 'submission.create', entity: 'submission', entityId: inserted.id,
        after: { practicalId: scope.practical.id, unitKey: unit.unitKey, version: next, sha256: file.sha256, fileName: file.name, late },
      })
      return inserted
    })
    return { status: 201, body: toCreated(row) }
  } catch (error) {
    // The same key sent twice at once: the loser of the race answers with the winner's row.
    if ((error as { code?: string }).code === UNIQUE_VIOLATION && idempotencyKey) {
      const earlier = await byIdempotencyKey(me.id, idempotencyKey)
      if (earlier) return { status: 201, body: toCreated(earlier) }
    }
    throw error
  }
}
