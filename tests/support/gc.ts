import { createHash, randomUUID } from 'node:crypto'
import { DEFAULT_RUBRIC } from '../../shared/types/course'
import { analyzeSubstrate, predictDistribution } from '../../shared/utils/halogenation'
import { simulatePeakTable, type SimulatePeakTableInput, type SimulatedPeakTable } from '../../shared/utils/simulation'
import type { MethodReagent, ReleasePolicy } from '../../server/database/schema'
import type { Client, Answer, Reply } from './http'
import { signedIn } from './http'
import { createUser, testDb, TEST_PASSWORD } from './db'

// A practical of its own for a GC-upload test: a course owned by a fresh instructor, a section
// running the practical (students in pairs at hood stations, a TA), a second section that does
// not run it, and the shared library's substrate with its retention windows. Simulated GC files
// come from shared/utils/simulation.ts with the method's own prediction as the truth.

export interface GcWindow { productSmiles: string, rtMin: number, rtMax: number, responseFactor: number }
interface Account { id: number, email: string }

export interface GcPractical {
  courseId: number
  sectionId: number
  practicalId: number
  /** Students of the section, two a hood station: [0, 1] at station 1, [2, 3] at station 2, … */
  students: Account[]
  /** A student of the same course in a section that does not run the practical. */
  outsider: Account
  ta: Account
  instructor: Account
  substrate: { id: number, name: string, smiles: string }
  windows: GcWindow[]
  solvent: { rtMin: number, rtMax: number } | null
  startingMaterial: { rtMin: number, rtMax: number } | null
  /** The method's prediction (n·r per class): the distribution the simulated runs are made from. */
  truth: Array<{ smiles: string, percent: number }>
  reactivity: { primary: number, secondary: number, tertiary: number }
  signIn: (account: Account) => Promise<Client>
  cleanup: () => Promise<void>
}

export interface GcPracticalOptions {
  substrate?: string
  reagent?: MethodReagent
  students?: number
  releasePolicy?: ReleasePolicy
  dueAt?: Date
}

const centre = (w: { rtMin: number, rtMax: number }) => (w.rtMin + w.rtMax) / 2

export async function makeGcPractical(options: GcPracticalOptions = {}): Promise<GcPractical> {
  const db = testDb()
  const tag = randomUUID().slice(0, 6)
  const substrate = await db.selectFrom('substrates').select(['id', 'name', 'smiles'])
    .where('name', '=', options.substrate ?? '2,3-dimethylbutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods').selectAll()
    .where('reagent', '=', options.reagent ?? 'cl2-light').where('ownerId', 'is', null).orderBy('id').executeTakeFirstOrThrow()

  const instructor = await createUser('instructor')
  const ta = await createUser('ta')
  const students = await Promise.all(Array.from({ length: options.students ?? 4 }, (_, i) => createUser('student', { name: `Test student ${tag}-${i + 1}` })))
  const outsider = await createUser('student', { name: `Test outsider ${tag}` })

  const course = await db.insertInto('courses').values({
    code: `TEST ${tag}`, title: 'GC upload test course', term: 'Test term', rubric: JSON.stringify(DEFAULT_RUBRIC),
    releasePolicy: options.releasePolicy ?? 'on-review', createdBy: instructor.id,
  }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('courseOwners').values({ courseId: course.id, userId: instructor.id }).execute()
  const today = new Date().toISOString().slice(0, 10)
  const section = (code: string) => db.insertInto('sections').values({
    courseId: course.id, code, weekday: 1, startTime: '08:30', endTime: '11:20', room: 'Test lab', hoodStations: 6,
    firstDate: today, lastDate: today,
  }).returning('id').executeTakeFirstOrThrow()
  const running = await section('X1')
  const other = await section('Y1')
  await db.insertInto('sectionTas').values({ sectionId: running.id, userId: ta.id }).execute()
  await db.insertInto('enrollments').values([
    ...students.map((s, i) => ({
      courseId: course.id,
      sectionId: running.id,
      userId: s.id,
      station: Math.floor(i / 2) + 1,
      seat: (i % 2) + 1,
    })),
    { courseId: course.id, sectionId: other.id, userId: outsider.id, station: 1, seat: 1 },
  ]).execute()
  const practical = await db.insertInto('practicals').values({
    courseId: course.id, title: `GC upload test ${tag}`, substrateId: substrate.id, methodId: method.id, workUnit: 'pair',
  }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('practicalSessions').values({
    practicalId: practical.id, sectionId: running.id, meetingDate: today,
    dueAt: options.dueAt ?? new Date(Date.now() + 7 * 86_400_000),
  }).execute()

  const analysis = analyzeSubstrate(substrate.smiles, { halogen: method.halogen })
  const products = new Set(analysis.products.map((p) => p.smiles))
  const windowRows = await db.selectFrom('substrateWindows').selectAll().where('substrateId', '=', substrate.id).orderBy('rtMin').execute()
  const reference = (kind: 'solvent' | 'starting-material') => {
    const w = windowRows.find((r) => r.kind === kind)
    return w ? { rtMin: w.rtMin, rtMax: w.rtMax } : null
  }
  const reactivity = { primary: method.rPrimary, secondary: method.rSecondary, tertiary: method.rTertiary }
  const userIds = [instructor.id, ta.id, outsider.id, ...students.map((s) => s.id)]

  return {
    courseId: course.id,
    sectionId: running.id,
    practicalId: practical.id,
    students,
    outsider,
    ta,
    instructor,
    substrate,
    windows: windowRows.filter((w) => w.kind === 'product' && w.productSmiles && products.has(w.productSmiles))
      .map((w) => ({ productSmiles: w.productSmiles!, rtMin: w.rtMin, rtMax: w.rtMax, responseFactor: w.responseFactor })),
    solvent: reference('solvent'),
    startingMaterial: reference('starting-material'),
    truth: predictDistribution(analysis, reactivity).map((p) => ({ smiles: p.smiles, percent: p.percent })),
    reactivity,
    signIn: (account) => signedIn(account.email, TEST_PASSWORD),
    cleanup: async () => {
      await deleteSubmissions(db.selectFrom('submissions').select('id').where('practicalId', '=', practical.id))
      await db.deleteFrom('courses').where('id', '=', course.id).execute()
      await db.deleteFrom('users').where('id', 'in', userIds).execute()
    },
  }
}

/** Removes submissions (their members and reviews cascade) and the files they kept. */
export async function deleteSubmissions(ids: { execute: () => Promise<Array<{ id: number }>> } | number[]) {
  const db = testDb()
  const list = Array.isArray(ids) ? ids : (await ids.execute()).map((r) => r.id)
  if (!list.length) return
  const files = await db.selectFrom('submissions').select('fileId').where('id', 'in', list).execute()
  await db.deleteFrom('submissions').where('id', 'in', list).execute()
  await db.deleteFrom('files').where('id', 'in', files.map((f) => f.fileId)).execute()
}

/**
 * A simulated product-mixture peak table for the practical: its windows, the method's
 * prediction as the true distribution, 1 % area noise, solvent and unreacted substrate peaks.
 */
export function gcTable(p: Pick<GcPractical, 'windows' | 'truth' | 'solvent' | 'startingMaterial'>, over: Partial<SimulatePeakTableInput> = {}): SimulatedPeakTable {
  return simulatePeakTable({
    seed: 11,
    windows: p.windows,
    distribution: p.truth,
    areaNoise: 0.01,
    rtJitter: 0.1,
    ...(p.solvent ? { solvent: { retentionTime: centre(p.solvent), area: 2_000_000 } } : {}),
    ...(p.startingMaterial ? { startingMaterial: { retentionTime: centre(p.startingMaterial), area: 400_000 } } : {}),
    ...over,
  })
}

export const sha256 = (bytes: string | Uint8Array) => createHash('sha256').update(bytes).digest('hex')

type Stored = Answer<'/api/practicals/:id/submissions', 'post'>
type Previewed = Answer<'/api/practicals/:id/submissions/preview', 'post'>
interface UploadOptions { name?: string, key?: string, preview?: boolean }

/** Sends a file as multipart `file` to the upload route (or its preview), as the page does. */
export function uploadGc(
  client: Client, practicalId: number, content: string | Uint8Array, options: UploadOptions & { preview: true },
): Promise<Reply<Previewed>>
export function uploadGc(
  client: Client, practicalId: number, content: string | Uint8Array, options?: UploadOptions & { preview?: false },
): Promise<Reply<Stored>>
export async function uploadGc(
  client: Client, practicalId: number, content: string | Uint8Array, options: UploadOptions = {},
): Promise<Reply<Stored | Previewed>> {
  const form = new FormData()
  form.append('file', new Blob([content as BlobPart], { type: 'text/csv' }), options.name ?? 'gc-run.csv')
  const init = { method: 'POST' as const, body: form, headers: options.key ? { 'Idempotency-Key': options.key } : undefined }
  return options.preview
    ? client.request(`/api/practicals/${practicalId}/submissions/preview`, init)
    : client.request(`/api/practicals/${practicalId}/submissions`, init)
}
