import type { Kysely } from 'kysely'
import type { Database } from '../schema'
import { DEFAULT_RUBRIC, DEFAULT_OUTLIER_TEST } from '../../../shared/types/course'
import { addDays, weekStart } from '../../../shared/utils/dates'
import { defaultDueAt } from '../../../shared/utils/procedure'
import { sectionMeetings } from '../../../shared/utils/schedule'
import { mulberry32, normalRandom, simulatePeakTable, type ExportStyle } from '../../../shared/utils/simulation'
import { startingScores } from '../../../shared/utils/grading'
import { studentUnitKey } from '../../services/submissions/work-units'
import { DEMO_DOMAIN } from './people'
import { seededPracticalChemistry, versionRowsOf } from './submissions'

// A large department's term for `npm run bench -- department`: one course of many sections (25
// students each, two sections per TA), four individual practicals every section has run, and
// each student's uploads (one to four versions, earlier ones returned, most last ones accepted).
// Rows are those the product writes: results come from the same engines (versionRowsOf), only
// inserted in batches, one transaction per section, so 80 sections take minutes, not hours.

export const DEPARTMENT_COURSE_CODE = 'CHEM 2290'
export const DEPARTMENT_STUDENTS_PER_SECTION = 25
const PRACTICALS = [
  { title: 'Chlorination of 1-chlorobutane (large term)', substrate: '1-chlorobutane', reagent: 'so2cl2-azo', weeksAgo: 8 },
  { title: 'Photochlorination of 2,3-dimethylbutane (large term)', substrate: '2,3-dimethylbutane', reagent: 'cl2-light', weeksAgo: 6 },
  { title: 'Photochlorination of 1-chlorobutane (large term)', substrate: '1-chlorobutane', reagent: 'cl2-light', weeksAgo: 4 },
  { title: 'Chlorination of 2,3-dimethylbutane (large term)', substrate: '2,3-dimethylbutane', reagent: 'so2cl2-azo', weeksAgo: 2 },
] as const
const STYLES: ExportStyle[] = ['csv', 'tab', 'semicolon-decimal-comma', 'aligned']
const TIMES = [['08:30', '11:20'], ['13:00', '15:50'], ['17:00', '19:50']] as const

/** Addresses of the department's people: students dept-s0001…, TAs dept-ta01…, the instructor. */
export const departmentEmail = {
  instructor: `dept-instructor@${DEMO_DOMAIN}`,
  ta: (n: number) => `dept-ta${String(n).padStart(2, '0')}@${DEMO_DOMAIN}`,
  student: (n: number) => `dept-s${String(n).padStart(4, '0')}@${DEMO_DOMAIN}`,
}

export interface DepartmentOptions {
  /** The sections to add, numbered from 0: a second call with a later range grows the same course. */
  fromSection: number
  toSection: number
  /** Every account gets this password hash (a benchmark signs in as a few of them). */
  passwordHash: string
  today?: string
}

async function departmentCourse(db: Kysely<Database>, options: DepartmentOptions) {
  const existing = await db.selectFrom('courses').select(['id', 'timezone']).where('code', '=', DEPARTMENT_COURSE_CODE).executeTakeFirst()
  if (existing) return existing
  const [instructor] = await insertUsers(db, [{ email: departmentEmail.instructor, name: 'Marisol Quenby', role: 'instructor' }], options)
  const course = await db.insertInto('courses').values({
    code: DEPARTMENT_COURSE_CODE, title: 'Organic Laboratory (large term)', term: 'Benchmark term', timezone: 'America/Chicago',
    outlierTest: DEFAULT_OUTLIER_TEST, rubric: JSON.stringify(DEFAULT_RUBRIC), createdBy: instructor!.id,
  }).returning(['id', 'timezone']).executeTakeFirstOrThrow()
  await db.insertInto('courseOwners').values({ courseId: course.id, userId: instructor!.id }).execute()
  for (const p of PRACTICALS) {
    const substrate = await db.selectFrom('substrates').select('id')
      .where('name', '=', p.substrate).where('ownerId', 'is', null).executeTakeFirstOrThrow()
    const method = await db.selectFrom('methods').select('id').where('reagent', '=', p.reagent).where('ownerId', 'is', null)
      .orderBy('id').executeTakeFirstOrThrow()
    await db.insertInto('practicals').values({
      courseId: course.id, title: p.title, substrateId: substrate.id, methodId: method.id, workUnit: 'student',
    }).execute()
  }
  return course
}

type Person = { email: string, name: string, role: 'student' | 'ta' | 'instructor' }

function insertUsers(db: Kysely<Database>, people: Person[], o: DepartmentOptions) {
  return db.insertInto('users').values(people.map((p) => ({ ...p, passwordHash: o.passwordHash }))).returning(['id', 'email']).execute()
}

/** Adds sections `fromSection`…`toSection - 1` (students, TAs, sessions, uploads and reviews) to the department course. */
export async function seedDepartment(db: Kysely<Database>, options: DepartmentOptions): Promise<{ courseId: number }> {
  const today = options.today ?? new Date().toISOString().slice(0, 10)
  const course = await db.transaction().execute((trx) => departmentCourse(trx, options))
  const practicals = await db.selectFrom('practicals').select('id').where('courseId', '=', course.id).orderBy('id').execute()
  const chemistry = await Promise.all(practicals.map((p) => seededPracticalChemistry(db, p.id)))
  const week0 = weekStart(today)
  for (let s = options.fromSection; s < options.toSection; s++) {
    await db.transaction().execute(async (trx) => {
      const taNumber = Math.floor(s / 2) + 1
      const ta = s % 2 === 0
        ? (await insertUsers(trx, [{ email: departmentEmail.ta(taNumber), name: `Bench Assistant ${taNumber}`, role: 'ta' }], options))[0]!
        : await trx.selectFrom('users').select(['id', 'email']).where('email', '=', departmentEmail.ta(taNumber)).executeTakeFirstOrThrow()
      const [start, end] = TIMES[s % TIMES.length]!
      const section = await trx.insertInto('sections').values({
        courseId: course.id, code: `L${String(s + 1).padStart(2, '0')}`, weekday: 1 + (s % 5), startTime: start, endTime: end,
        room: `Bellweather Hall ${200 + (s % 12)}`, hoodStations: 13, studentsPerStation: 2,
        firstDate: addDays(week0, -10 * 7), lastDate: addDays(week0, 4 * 7), skippedDates: [],
      }).returningAll().executeTakeFirstOrThrow()
      await trx.insertInto('sectionTas').values({ sectionId: section.id, userId: ta.id }).execute()
      const first = s * DEPARTMENT_STUDENTS_PER_SECTION + 1
      const students = await insertUsers(trx, Array.from({ length: DEPARTMENT_STUDENTS_PER_SECTION }, (_, i) => ({
        email: departmentEmail.student(first + i), name: `Bench Student ${first + i}`, role: 'student' as const,
      })), options)
      await trx.insertInto('enrollments').values(students.map((u, i) => ({
        courseId: course.id, sectionId: section.id, userId: u.id, station: Math.floor(i / 2) + 1, seat: (i % 2) + 1,
        studentId: `LB${String(3100000 + first + i).padStart(7, '0')}`,
      }))).execute()
      const meetings = sectionMeetings({ ...section, timezone: course.timezone })
      for (const [k, p] of PRACTICALS.entries()) {
        const week = addDays(week0, -7 * p.weeksAgo)
        const meeting = meetings.find((m) => m.date >= week && m.date <= addDays(week, 6))
        if (!meeting) continue
        const dueAt = defaultDueAt(meeting.date, course.timezone)
        await trx.insertInto('practicalSessions')
          .values({ practicalId: practicals[k]!.id, sectionId: section.id, meetingDate: meeting.date, dueAt }).execute()
        await seedUploads(trx, { practicalId: practicals[k]!.id, sectionId: section.id, meetingDate: meeting.date, dueAt, reviewer: ta.id },
          students, chemistry[k]!, s * 1000 + k * 100)
      }
    })
  }
  return { courseId: course.id }
}

interface Session { practicalId: number, sectionId: number, meetingDate: string, dueAt: Date, reviewer: number }

/** Each student's versions for one practical, their members and reviews, in a few multi-row inserts. */
async function seedUploads(
  db: Kysely<Database>, session: Session, students: Array<{ id: number }>,
  { practical, chem }: Awaited<ReturnType<typeof seededPracticalChemistry>>, seed: number,
) {
  const gauss = normalRandom(mulberry32(seed))
  const versions = students.flatMap((student, i) => {
    const count = 1 + ((seed + i) % 4)
    return Array.from({ length: count }, (_, v) => {
      const weights = chem.expected.percents.map((e) => e.percent * Math.exp(0.15 * gauss()))
      const total = weights.reduce((a, b) => a + b, 0)
      const text = simulatePeakTable({
        seed: seed * 10 + i * 5 + v, windows: chem.windows, areaNoise: 0.025, rtJitter: 0.2,
        distribution: chem.expected.percents.map((e, j) => ({ smiles: e.smiles, percent: (weights[j]! / total) * 100 })),
        solvent: { retentionTime: 1.38, area: 2_400_000 }, style: STYLES[(i + v) % STYLES.length],
      }).text
      const uploadedAt = new Date(Date.parse(`${session.meetingDate}T18:00:00Z`) + (6 + v * 40 + (i % 30)) * 3_600_000)
      return {
        student, last: v === count - 1, uploadedAt,
        rows: versionRowsOf({
          practicalId: session.practicalId, sectionId: session.sectionId, unitKey: studentUnitKey(student.id), version: v + 1,
          text, uploadedAt, uploader: student.id, chem, dueAt: session.dueAt, fileName: `gc-run-v${v + 1}.csv`,
        }),
      }
    })
  })
  const files = await db.insertInto('files').values(versions.map((v) => v.rows.file)).returning('id').execute()
  const inserted = await db.insertInto('submissions')
    .values(versions.map((v, i) => ({ ...v.rows.submission, fileId: files[i]!.id })))
    .returning(['id']).execute()
  await db.insertInto('submissionMembers')
    .values(versions.map((v, i) => ({ submissionId: inserted[i]!.id, userId: v.student.id }))).execute()
  // Earlier versions were returned; three last versions in five were accepted, the rest wait for review.
  interface SeededReview {
    submissionId: number
    decision: 'accept' | 'return'
    reason: string | null
    scores: Record<string, number>
    total: number | null
    at: Date
  }
  const reviews = versions.flatMap((v, i): SeededReview[] => {
    const at = new Date(v.uploadedAt.getTime() + 20 * 3_600_000)
    const submissionId = inserted[i]!.id
    if (!v.last) return [{ submissionId, decision: 'return', reason: 'Integrate the product region again.', scores: {}, total: null, at }]
    if ((seed + i) % 5 >= 3 || v.rows.submission.attention > 0) return []
    const scores = startingScores(practical.rubric, {
      observed: v.rows.factor, expected: chem.expected.factors[chem.keyFactor], tolerancePercent: practical.accuracyTolerancePercent,
    })
    const full = Object.fromEntries(practical.rubric.map((c) => [c.key, c.kind === 'accuracy' ? scores[c.key] ?? 0 : c.maxPoints]))
    const total = Object.values(full).reduce((a, b) => a + b, 0)
    return [{ submissionId, decision: 'accept', reason: null, scores: full, total, at }]
  })
  if (!reviews.length) return
  await db.insertInto('reviews').values(reviews.map((r) => ({
    submissionId: r.submissionId, reviewerId: session.reviewer, decision: r.decision, reason: r.reason, comment: '',
    scores: JSON.stringify(r.scores), total: r.total, createdAt: r.at,
  }))).execute()
  for (const decision of ['accept', 'return'] as const) {
    const ids = reviews.filter((r) => r.decision === decision).map((r) => r.submissionId)
    if (ids.length) {
      await db.updateTable('submissions').set({ status: decision === 'accept' ? 'accepted' : 'returned' })
        .where('id', 'in', ids).execute()
    }
  }
}
