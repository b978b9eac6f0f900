import type { MyLab } from '#shared/types/section'
import { partnerNames } from '~~/server/services/roster'
import { sectionViews } from '~~/server/services/sections'

// A student's own lab: section, station, partner, meetings and practicals. Nothing about others
// beyond their partner's name.
export default defineEventHandler(async (event): Promise<MyLab> => {
  const me = requireRole(event, 'student')
  const db = useDb()
  const mine = await db.selectFrom('enrollments').select(['sectionId', 'station', 'seat'])
    .where('userId', '=', me.id).where('status', '=', 'active').execute()
  if (!mine.length) return { enrollments: [] }
  const views = await sectionViews({ ids: mine.map((e) => e.sectionId) })
  const courseRows = await db.selectFrom('courses').select(['id', 'code', 'title', 'term', 'timezone'])
    .where('id', 'in', views.map((v) => v.courseId)).execute()
  const courses = new Map(courseRows.map((c) => [c.id, c]))
  const practicals = await db.selectFrom('practicalSessions')
    .innerJoin('practicals', 'practicals.id', 'practicalSessions.practicalId')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .select([
      'practicals.id', 'practicals.title', 'practicalSessions.sectionId', 'practicalSessions.meetingDate', 'practicalSessions.dueAt',
      'substrates.name as substrate', 'methods.name as method', 'methods.reagent',
    ])
    .where('practicalSessions.sectionId', 'in', mine.map((e) => e.sectionId)).orderBy('practicalSessions.meetingDate').execute()

  const enrollments = await Promise.all(mine.map(async (e) => {
    const view = views.find((v) => v.id === e.sectionId)!
    const partners = await partnerNames(db, { userId: me.id, sectionId: e.sectionId, station: e.station })
    return {
      course: courses.get(view.courseId)!,
      section: {
        id: view.id, code: view.code, weekday: view.weekday, startTime: view.startTime, endTime: view.endTime, room: view.room,
        tas: view.tas.map((t) => t.name),
      },
      station: e.station,
      seat: e.seat,
      partners,
      meetings: view.meetings,
      practicals: practicals.filter((p) => p.sectionId === e.sectionId)
        .map((p) => ({
          id: p.id, title: p.title, meetingDate: p.meetingDate, dueAt: p.dueAt.toISOString(), substrate: p.substrate, method: p.method,
          reagent: p.reagent,
        })),
    }
  }))
  return { enrollments }
})
