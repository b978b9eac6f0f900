import { idParamsSchema } from '#shared/types/fields'
import { sessionsInputSchema, type SessionView } from '#shared/types/practical'
import { defaultDueAt } from '#shared/utils/procedure'

// Which sections run the practical at which of their meetings, and when results are due. The
// list replaces the stored one; each row must name a section of this course and one of its
// meetings (skipped dates are not meetings).
export default defineEventHandler(async (event): Promise<SessionView[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { practical, course } = await requirePracticalAccess(event, id, 'manage')
  const { sessions } = await readBodyAs(event, sessionsInputSchema)
  const sections = new Map((await sectionRows().where('sections.courseId', '=', course.id).execute()).map((row) => [row.id, row]))

  const rows = sessions.map((s, i) => {
    const section = sections.get(s.sectionId)
    if (!section) invalid([{ field: `sessions.${i}.sectionId`, message: 'Not a section of this course' }])
    const meeting = meetingsOf(section).find((m) => m.date === s.meetingDate)
    if (!meeting) invalid([{ field: `sessions.${i}.meetingDate`, message: `${s.meetingDate} is not a meeting of section ${section.code}` }])
    const dueAt = s.dueAt ? new Date(s.dueAt) : defaultDueAt(s.meetingDate, course.timezone)
    if (dueAt.getTime() < Date.parse(meeting.end)) invalid([{ field: `sessions.${i}.dueAt`, message: `Due after the meeting of section ${section.code} ends` }])
    return { practicalId: id, sectionId: s.sectionId, meetingDate: s.meetingDate, dueAt }
  })

  await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('practicalSessions').select(['sectionId', 'meetingDate', 'dueAt']).where('practicalId', '=', id).orderBy('sectionId').execute()
    await trx.deleteFrom('practicalSessions').where('practicalId', '=', id).execute()
    if (rows.length) await trx.insertInto('practicalSessions').values(rows).execute()
    await touchPractical(trx, id)
    await audit(trx, event, {
      action: 'practical.sessions', entity: 'practical', entityId: practical.id,
      before, after: rows.map(({ practicalId: _p, ...r }) => r),
    })
  })
  return (await practicalSessionViews([id], null)).get(id) ?? []
})
