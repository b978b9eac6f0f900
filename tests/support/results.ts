import { testDb } from './db'
import { insertResult, makeCourse } from './fixtures'

// Helpers for the class results, digest and cross-term tests, on top of fixtures.ts.

// Invented names (no real people), distinct within a fixture course so a test can look for them.
const FIRST = ['Ardith', 'Bexley', 'Corvin', 'Delphine', 'Emrys', 'Fenwick', 'Galena', 'Hesper', 'Ilsabet', 'Jory', 'Kestrel', 'Linnea']
const LAST = ['Quarrie', 'Vantongeren', 'Mallowby', 'Stroud-Ashe', 'Pellham', 'Trevanion', 'Oakhurst', 'Wrenfield']

export type FixtureWorld = Awaited<ReturnType<typeof makeCourse>>
export type NamedStudent = FixtureWorld['sections'][number]['students'][number] & { name: string, sectionId: number }

/**
 * A fixture course whose term is `term` and whose students, TAs and instructor have names of
 * their own (makeCourse gives everyone the same one).
 */
export async function makeNamedCourse(options: Parameters<typeof makeCourse>[0] & { term?: string } = {}) {
  const world = await makeCourse(options)
  const db = testDb()
  if (options.term) await db.updateTable('courses').set({ term: options.term }).where('id', '=', world.course.id).execute()
  const tag = String(world.course.id)
  let i = 0
  const students: NamedStudent[] = []
  for (const section of world.sections) {
    for (const student of section.students) {
      const name = `${FIRST[i % FIRST.length]} ${LAST[Math.floor(i / FIRST.length) % LAST.length]} ${tag}`
      await db.updateTable('users').set({ name }).where('id', '=', student.id).execute()
      students.push({ ...student, name, sectionId: section.id })
      i++
    }
    await db.updateTable('users').set({ name: `Teaching Assistant ${section.id}` }).where('id', '=', section.ta.id).execute()
  }
  await db.updateTable('users').set({ name: `Instructor ${tag}` }).where('id', '=', world.owner.id).execute()
  return { ...world, students }
}

export interface RichResult {
  secondary: number
  molePercents?: Array<{ smiles: string, percent: number }>
  flags?: Array<{ code: string, severity: 'info' | 'warning' | 'danger', message: string }>
  status?: 'pending' | 'accepted' | 'returned'
  version?: number
  excluded?: string
  late?: boolean
}

/** insertResult with mole %, flags and lateness as well. */
export async function insertRichResult(practicalId: number, student: { id: number, sectionId: number }, r: RichResult) {
  const id = await insertResult(
    practicalId, student.sectionId, student.id,
    { secondary: r.secondary },
    { status: r.status, version: r.version, excluded: r.excluded },
  )
  await testDb().updateTable('submissions').set({
    result: JSON.stringify({ molePercents: r.molePercents ?? [], factors: { secondaryToPrimary: r.secondary, tertiaryToPrimary: null } }),
    flags: JSON.stringify(r.flags ?? []),
    late: r.late ?? false,
  }).where('id', '=', id).execute()
  return id
}

export const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length
export const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}
