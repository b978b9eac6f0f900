import { createHash, randomUUID } from 'node:crypto'
import { DEFAULT_RUBRIC } from '../../shared/types/course'
import { analyzeSubstrate, predictDistribution } from '../../shared/utils/halogenation'
import { simulatePeakTable, type BadRun } from '../../shared/utils/simulation'
import type { OutlierTest, ReleasePolicy, StoredFlag, SubmissionStatus } from '../../server/database/schema'
import type { Client } from './http'
import { signedIn } from './http'
import { createUser, testDb } from './db'

// A course of its own for the review tests: a fresh instructor, sections each with its own TA,
// students in pairs at hood stations, and a practical on the shared library's 1-chlorobutane
// (four dichlorobutanes, retention windows seeded) with sulfuryl chloride and AIBN.

export type Account = Awaited<ReturnType<typeof createUser>> & { name: string }

export interface ReviewSection {
  id: number
  code: string
  ta: Account
  /** Two a station: [0, 1] at station 1, [2, 3] at station 2, … */
  students: Account[]
}

export interface ReviewWorld {
  owner: Account
  courseId: number
  courseCode: string
  practicalId: number
  sections: ReviewSection[]
  /** Product SMILES → window (minutes) of the practical's substrate. */
  windows: Array<{ productSmiles: string, rtMin: number, rtMax: number, responseFactor: number }>
  /**
   * The mole % simulated runs are made from: the shared library's reference distribution for
   * the substrate and reagent (a realistic haloalkane mixture, which a run is judged against),
   * else the method's prediction (n·r per class).
   */
  truth: Array<{ smiles: string, percent: number }>
}

export interface ReviewWorldOptions {
  sections?: number
  studentsPerSection?: number
  /** Name of student j (0-based) of section i; default "Student <tag> <i>-<j>". */
  name?: (i: number, j: number) => string
  outlierTest?: OutlierTest
  releasePolicy?: ReleasePolicy
  accuracyTolerancePercent?: number
}

async function account(role: 'instructor' | 'ta' | 'student', name: string): Promise<Account> {
  return { ...(await createUser(role, { name })), name }
}

export async function makeReviewWorld(options: ReviewWorldOptions = {}): Promise<ReviewWorld> {
  const db = testDb()
  const tag = randomUUID().slice(0, 6)
  const substrate = await db.selectFrom('substrates').select(['id', 'smiles']).where('name', '=', '1-chlorobutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods').selectAll().where('reagent', '=', 'so2cl2-azo').where('ownerId', 'is', null).orderBy('id').executeTakeFirstOrThrow()
  const owner = await account('instructor', `Instructor ${tag}`)
  const course = await db.insertInto('courses').values({
    code: `REV ${tag}`, title: 'Review test course', term: 'Test term', rubric: JSON.stringify(DEFAULT_RUBRIC),
    outlierTest: options.outlierTest ?? 'grubbs', releasePolicy: options.releasePolicy ?? 'on-review',
    accuracyTolerancePercent: options.accuracyTolerancePercent ?? 15, createdBy: owner.id,
  }).returning(['id', 'code']).executeTakeFirstOrThrow()
  await db.insertInto('courseOwners').values({ courseId: course.id, userId: owner.id }).execute()
  const practical = await db.insertInto('practicals').values({
    courseId: course.id, title: `Review practical ${tag}`, substrateId: substrate.id, methodId: method.id, workUnit: 'pair',
  }).returning('id').executeTakeFirstOrThrow()

  const sections: ReviewSection[] = []
  for (let i = 0; i < (options.sections ?? 2); i++) {
    const code = `R${i + 1}`
    const section = await db.insertInto('sections').values({
      courseId: course.id, code, weekday: 1 + i, startTime: '08:30', endTime: '11:20', room: `Review lab ${tag}`, hoodStations: 12,
      firstDate: '2026-09-07', lastDate: '2026-12-14',
    }).returning('id').executeTakeFirstOrThrow()
    const ta = await account('ta', `TA ${tag} ${code}`)
    await db.insertInto('sectionTas').values({ sectionId: section.id, userId: ta.id }).execute()
    // Due long after any test run, so nothing uploaded here is late unless a test says so.
    await db.insertInto('practicalSessions').values({ practicalId: practical.id, sectionId: section.id, meetingDate: '2026-10-05', dueAt: '2099-01-01T00:00:00Z' }).execute()
    const students: Account[] = []
    for (let j = 0; j < (options.studentsPerSection ?? 4); j++) {
      students.push(await account('student', options.name?.(i, j) ?? `Student ${tag} ${i}-${j}`))
    }
    if (students.length) {
      await db.insertInto('enrollments').values(students.map((s, j) => ({ courseId: course.id, sectionId: section.id, userId: s.id, station: Math.floor(j / 2) + 1, seat: (j % 2) + 1 }))).execute()
    }
    sections.push({ id: section.id, code, ta, students })
  }
  const windows = await db.selectFrom('substrateWindows').select(['productSmiles', 'rtMin', 'rtMax', 'responseFactor'])
    .where('substrateId', '=', substrate.id).where('kind', '=', 'product').execute()
  const analysis = analyzeSubstrate(substrate.smiles, { halogen: method.halogen })
  const predicted = predictDistribution(analysis, { primary: method.rPrimary, secondary: method.rSecondary, tertiary: method.rTertiary })
  const reference = await db.selectFrom('substrateReferences').select('percents').where('substrateId', '=', substrate.id).where('reagent', '=', method.reagent).executeTakeFirst()
  return {
    owner, courseId: course.id, courseCode: course.code, practicalId: practical.id, sections,
    windows: windows.map((w) => ({ ...w, productSmiles: w.productSmiles! })),
    truth: reference?.percents ?? predicted.map((p) => ({ smiles: p.smiles, percent: p.percent })),
  }
}

export function signInAs(a: Account): Promise<Client> {
  return signedIn(a.email, a.password)
}

/** A simulated GC peak table for the world's practical (solvent and starting material included). */
export function reviewPeakTable(
  world: ReviewWorld,
  seed: number,
  options: { scale?: Record<string, number>, fault?: BadRun, faultSmiles?: string } = {},
): string {
  const faultProduct = options.faultSmiles ? world.windows.findIndex((w) => w.productSmiles === options.faultSmiles) : -1
  return simulatePeakTable({
    fault: options.fault,
    ...(faultProduct >= 0 ? { faultProduct } : {}),
    seed,
    windows: world.windows,
    distribution: world.truth.map((p) => ({ smiles: p.smiles, percent: p.percent * (options.scale?.[p.smiles] ?? 1) })),
    solvent: { retentionTime: 1.4, area: 400_000 },
    startingMaterial: { retentionTime: 2.3, area: 250_000 },
  }).text
}

/** Uploads a file as a student through the public route. */
export async function uploadAs(client: Client, practicalId: number, text: string, fileName = 'run.csv') {
  const form = new FormData()
  form.append('file', new Blob([text], { type: 'text/csv' }), fileName)
  return client.request(`/api/practicals/${practicalId}/submissions`, { method: 'POST', body: form })
}

export interface StoredUnitVersion {
  section: ReviewSection
  /** The hood station (1-based): the unit is its pair of students. */
  station: number
  factor: number | null
  version?: number
  status?: SubmissionStatus
  flags?: StoredFlag[]
  createdAt?: Date
  late?: boolean
  fileName?: string
}

const RANK = { info: 0, warning: 1, danger: 2 } as const

/** A stored version made directly in the database (no upload), for queue and statistics cases. */
export async function insertUnitVersion(world: ReviewWorld, v: StoredUnitVersion): Promise<number> {
  const db = testDb()
  const members = v.section.students.slice((v.station - 1) * 2, v.station * 2)
  const content = Buffer.from(`Peak,RT,Area\n1,3.4,${v.factor ?? 0}\n`)
  const sha256 = createHash('sha256').update(content).update(randomUUID()).digest('hex')
  const file = await db.insertInto('files').values({ sha256, byteSize: content.length, mediaType: 'text/csv', originalName: v.fileName ?? 'stored.csv', content, uploadedBy: members[0]!.id })
    .returning('id').executeTakeFirstOrThrow()
  const flags = v.flags ?? []
  const row = await db.insertInto('submissions').values({
    practicalId: world.practicalId, sectionId: v.section.id, unitKey: `station:${v.section.id}:${v.station}`, version: v.version ?? 1,
    fileId: file.id, inputKind: 'peak-table', sha256,
    result: JSON.stringify({ molePercents: [], factors: { secondaryToPrimary: v.factor, tertiaryToPrimary: null }, relative: [], conversion: null, unassignedPercent: 0, warnings: [], keyFactor: 'secondaryToPrimary' }),
    flags: JSON.stringify(flags), attention: flags.reduce((m, f) => Math.max(m, RANK[f.severity]), 0),
    factorSecondary: v.factor, factorTertiary: null, status: v.status ?? 'pending', late: v.late ?? false,
    submittedBy: members[0]!.id, idempotencyKey: null, ...(v.createdAt ? { createdAt: v.createdAt } : {}),
  }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('submissionMembers').values(members.map((m) => ({ submissionId: row.id, userId: m.id }))).execute()
  return row.id
}

export const DANGER: StoredFlag = { code: 'missing-product', severity: 'danger', message: 'No peak in the window of product b.' }
export const WARNING: StoredFlag = { code: 'retention-drift', severity: 'warning', message: 'Peaks sit near the window edges.' }

/** The audit rows written about one submission, oldest first. */
export function auditOf(submissionId: number) {
  return testDb().selectFrom('auditLog').selectAll().where('entity', '=', 'submission').where('entityId', '=', String(submissionId)).orderBy('id').execute()
}
