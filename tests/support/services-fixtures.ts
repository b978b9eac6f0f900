import { createHash, randomUUID } from 'node:crypto'
import type { Database, SubmissionStatus } from '../../server/database/schema'
import type { Kysely } from 'kysely'
import type { Actor } from '../../server/utils/audit'
import type { PracticalScope } from '../../server/utils/access'
import { createUser, testDb } from './db'

// Arranging for the service tests: the seeded demo practical as a scope, fresh students with work
// units of their own (so tests never touch the demo's units), and versions written directly.

/** The first seeded practical that runs in a section, as its owner's scope. */
export async function demoPracticalScope(db: Kysely<Database> = testDb()): Promise<PracticalScope> {
  const row = await db.selectFrom('practicals').innerJoin('practicalSessions', 'practicalSessions.practicalId', 'practicals.id')
    .select(['practicals.id']).orderBy('practicals.id').executeTakeFirstOrThrow()
  const practical = await db.selectFrom('practicals')
    .select(['id', 'courseId', 'title', 'substrateId', 'methodId', 'workUnit', 'notes', 'resultsReleasedAt'])
    .where('id', '=', row.id).executeTakeFirstOrThrow()
  const course = await db.selectFrom('courses').selectAll().where('id', '=', practical.courseId).executeTakeFirstOrThrow()
  const owner = await db.selectFrom('courseOwners').innerJoin('users', 'users.id', 'courseOwners.userId')
    .select(['users.id', 'users.name', 'users.role']).where('courseOwners.courseId', '=', course.id).executeTakeFirstOrThrow()
  const sessions = await db.selectFrom('practicalSessions').select('sectionId').where('practicalId', '=', practical.id).execute()
  return { me: owner, course, role: 'owner', sectionIds: null, practical, sessionSectionIds: sessions.map((s) => s.sectionId) }
}

/** A new instructor acting from a documentation address (RFC 5737). */
export async function newActor(role: 'instructor' | 'ta' = 'instructor'): Promise<Actor> {
  const user = await createUser(role)
  return { id: user.id, name: `Test ${role}`, role, ip: '192.0.2.7' }
}

/** A fresh student's own work unit key ('user:<id>'), with the student's id. */
export async function newStudentUnit() {
  const student = await createUser('student')
  return { studentId: student.id, unitKey: `user:${student.id}` }
}

export interface VersionSpec {
  practicalId: number
  sectionId: number
  unitKey: string
  submittedBy: number
  version: number
  status?: SubmissionStatus
  excluded?: boolean
  factorSecondary?: number | null
  factorTertiary?: number | null
  attention?: number
}

/** One stored version with a small peak table as its file, written straight to the database. */
export async function insertVersion(spec: VersionSpec, db: Kysely<Database> = testDb()) {
  const text = `rt,area\n1.0,${spec.version}\n${randomUUID()}\n`
  const sha256 = createHash('sha256').update(text).digest('hex')
  const file = await db.insertInto('files').values({
    sha256, byteSize: text.length, mediaType: 'text/plain', originalName: 'peaks.csv', content: Buffer.from(text), uploadedBy: spec.submittedBy,
  }).returning('id').executeTakeFirstOrThrow()
  return db.insertInto('submissions').values({
    practicalId: spec.practicalId, sectionId: spec.sectionId, unitKey: spec.unitKey, version: spec.version, fileId: file.id,
    inputKind: 'peak-table', sha256,
    result: JSON.stringify({
      molePercents: [],
      factors: { secondaryToPrimary: spec.factorSecondary ?? null, tertiaryToPrimary: spec.factorTertiary ?? null },
    }),
    flags: JSON.stringify([]), attention: spec.attention ?? 0,
    factorSecondary: spec.factorSecondary ?? null, factorTertiary: spec.factorTertiary ?? null,
    status: spec.status ?? 'pending', submittedBy: spec.submittedBy,
    excludedAt: spec.excluded ? new Date() : null, exclusionReason: spec.excluded ? 'test exclusion' : null,
  }).returningAll().executeTakeFirstOrThrow()
}

/** The audit rows about one entity, oldest first. */
export function auditRowsOf(entity: string, entityId: number, db: Kysely<Database> = testDb()) {
  return db.selectFrom('auditLog').selectAll().where('entity', '=', entity).where('entityId', '=', String(entityId)).orderBy('id').execute()
}
