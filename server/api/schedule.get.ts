import { z } from 'zod'
import type { ScheduleEntry } from '#shared/types/section'

const date = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use YYYY-MM-DD')
const querySchema = z.object({ from: date, to: date }).refine((q) => q.to >= q.from, { message: 'to: on or after from', path: ['to'] })

// Every meeting the caller may see between two dates (inclusive), with what it runs.
export default defineEventHandler(async (event): Promise<ScheduleEntry[]> => {
  const me = requireUser(event)
  const { from, to } = readQueryAs(event, querySchema)
  const db = useDb()
  const courseIds = await visibleCourseIds(me)
  if (!courseIds.length) return []
  let sectionQuery = sectionRows().where('sections.courseId', 'in', courseIds)
  if (me.role === 'ta') sectionQuery = sectionQuery.where('sections.id', 'in', db.selectFrom('sectionTas').select('sectionId').where('userId', '=', me.id))
  if (me.role === 'student') {
    sectionQuery = sectionQuery.where('sections.id', 'in', db.selectFrom('enrollments').select('sectionId').where('userId', '=', me.id).where('status', '=', 'active'))
  }
  const sections = await sectionQuery.execute()
  if (!sections.length) return []
  const sessions = await db.selectFrom('practicalSessions').innerJoin('practicals', 'practicals.id', 'practicalSessions.practicalId')
    .select(['practicalSessions.sectionId', 'practicalSessions.meetingDate', 'practicals.id', 'practicals.title'])
    .where('practicalSessions.sectionId', 'in', sections.map((s) => s.id))
    .where('practicalSessions.meetingDate', '>=', from).where('practicalSessions.meetingDate', '<=', to).execute()
  const taIds = [...new Set(sections.flatMap((s) => s.taIds))]
  const taNames = new Map((taIds.length ? await db.selectFrom('users').select(['id', 'name']).where('id', 'in', taIds).execute() : []).map((u) => [u.id, u.name]))

  const entries: ScheduleEntry[] = []
  for (const s of sections) {
    for (const m of meetingsOf(s)) {
      if (m.date < from || m.date > to) continue
      entries.push({
        ...m,
        sectionId: s.id,
        sectionCode: s.code,
        courseId: s.courseId,
        courseCode: s.courseCode,
        timezone: s.timezone,
        room: s.room,
        enrolled: s.enrolled,
        tas: s.taIds.map((id) => taNames.get(id) ?? ''),
        practicals: sessions.filter((p) => p.sectionId === s.id && p.meetingDate === m.date).map((p) => ({ id: p.id, title: p.title })),
      })
    }
  }
  return entries.sort((a, b) => a.start.localeCompare(b.start))
})
