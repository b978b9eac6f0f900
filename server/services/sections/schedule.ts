import type { ScheduleEntry } from '#shared/types/section'
import type { SessionUser } from '#shared/types/auth'
import { visibleCourseIds } from '../../utils/access'
import { useDb } from '../../utils/db'
import { meetingsOf, sectionRows } from './section-rows'

/** Every meeting the caller may see between two dates (inclusive), with what it runs. */
export async function scheduleEntries(me: SessionUser, from: string, to: string): Promise<ScheduleEntry[]> {
  const db = useDb()
  const courseIds = await visibleCourseIds(me)
  if (!courseIds.length) return []
  let sectionQuery = sectionRows().where('sections.courseId', 'in', courseIds)
  if (me.role === 'ta') sectionQuery = sectionQuery.where('sections.id', 'in', db.selectFrom('sectionTas').select('sectionId')
    .where('userId', '=', me.id))
  if (me.role === 'student') {
    sectionQuery = sectionQuery.where('sections.id', 'in', db.selectFrom('enrollments').select('sectionId').where('userId', '=', me.id)
      .where('status', '=', 'active'))
  }
  const sections = await sectionQuery.execute()
  if (!sections.length) return []
  const sessions = await db.selectFrom('practicalSessions').innerJoin('practicals', 'practicals.id', 'practicalSessions.practicalId')
    .select(['practicalSessions.sectionId', 'practicalSessions.meetingDate', 'practicals.id', 'practicals.title'])
    .where('practicalSessions.sectionId', 'in', sections.map((s) => s.id))
    .where('practicalSessions.meetingDate', '>=', from).where('practicalSessions.meetingDate', '<=', to).execute()
  const taIds = [...new Set(sections.flatMap((s) => s.taIds))]
  const taNames = new Map((taIds.length ? await db.selectFrom('users').select(['id', 'name']).where('id', 'in', taIds).execute() : [])
    .map((u) => [u.id, u.name]))

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
}
