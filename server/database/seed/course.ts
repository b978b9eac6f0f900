import { DEFAULT_RUBRIC, DEFAULT_OUTLIER_TEST } from '../../../shared/types/course'
import { addDays, weekStart } from '../../../shared/utils/dates'
import type { SeedContext } from './context'
import { DEMO_DOMAIN } from './people'

// CHEM 2240 at the fictional Larkspur State University: four sections, two TAs, 64 students
// in pairs. The term runs from eight weeks before the seeding week to six weeks after it.
export const DEMO_SECTIONS = [
  { code: 'M1', weekday: 1, startTime: '08:30', endTime: '11:20', room: 'Bellweather Hall 214', ta: 'ta1' },
  { code: 'T1', weekday: 2, startTime: '13:00', endTime: '15:50', room: 'Bellweather Hall 216', ta: 'ta2' },
  { code: 'W1', weekday: 3, startTime: '13:00', endTime: '15:50', room: 'Bellweather Hall 214', ta: 'ta1' },
  { code: 'R1', weekday: 4, startTime: '08:30', endTime: '11:20', room: 'Bellweather Hall 216', ta: 'ta2' },
] as const

const STUDENTS_PER_SECTION = 16

function termName(today: string): string {
  const [year, month] = today.split('-').map(Number) as [number, number]
  return `${month >= 8 ? 'Fall' : month >= 6 ? 'Summer' : 'Spring'} ${year}`
}

export async function seedCourse(ctx: SeedContext): Promise<void> {
  const { db, users } = ctx
  const instructorId = users.get(`instructor@${DEMO_DOMAIN}`)!
  const course = await db.insertInto('courses').values({
    code: 'CHEM 2240',
    title: 'Organic Laboratory II',
    term: termName(ctx.today),
    timezone: 'America/Chicago',
    // The demo class runs the generalized ESD test, the default for new courses.
    outlierTest: DEFAULT_OUTLIER_TEST,
    rubric: JSON.stringify(DEFAULT_RUBRIC),
    createdBy: instructorId,
  }).returning('id').executeTakeFirstOrThrow()
  ctx.ids.courseId = course.id
  await db.insertInto('courseOwners').values({ courseId: course.id, userId: instructorId }).execute()

  const week0 = weekStart(ctx.today)
  const firstDate = addDays(week0, -8 * 7)
  // The term ends the week after practical 2, as a term ends before the winter break.
  const lastDate = addDays(week0, 2 * 7 + 4)
  // A campus holiday two weeks ago falls on the Thursday section (its meeting is skipped).
  const holiday = addDays(week0, -2 * 7 + 3)

  for (const [index, s] of DEMO_SECTIONS.entries()) {
    const section = await db.insertInto('sections').values({
      courseId: course.id,
      code: s.code,
      weekday: s.weekday,
      startTime: s.startTime,
      endTime: s.endTime,
      room: s.room,
      hoodStations: 12,
      studentsPerStation: 2,
      firstDate,
      lastDate,
      skippedDates: s.weekday === 4 ? [holiday] : [],
    }).returning('id').executeTakeFirstOrThrow()
    ctx.ids.sections.set(s.code, section.id)
    await db.insertInto('sectionTas').values({ sectionId: section.id, userId: users.get(`${s.ta}@${DEMO_DOMAIN}`)! }).execute()

    // Students 01–16 in M1, 17–32 in T1 …; roster order pairs them onto stations 1–8.
    const enrollments = Array.from({ length: STUDENTS_PER_SECTION }, (_, i) => {
      const n = index * STUDENTS_PER_SECTION + i + 1
      return {
        courseId: course.id,
        sectionId: section.id,
        userId: users.get(`student${String(n).padStart(2, '0')}@${DEMO_DOMAIN}`)!,
        station: Math.floor(i / 2) + 1,
        seat: (i % 2) + 1,
        // Invented registrar ids for the demo: "LS" and seven digits.
        studentId: `LS${String(2640100 + n * 37).padStart(7, '0')}`,
      }
    })
    await db.insertInto('enrollments').values(enrollments).execute()
  }
}
