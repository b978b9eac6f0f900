import { idParamsSchema } from '#shared/types/fields'
import { type PracticalListItem } from '#shared/types/practical'
import { practicalSessionViews } from '~~/server/services/practicals'

// A course's practicals. TAs and students see only practicals that run in their sections, and
// only those sections' ids and dates; the section filter is part of the query.
export default defineEventHandler(async (event): Promise<PracticalListItem[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requireCourseAccess(event, id)
  let query = useDb().selectFrom('practicals')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId')
    .select(['practicals.id', 'practicals.title', 'practicals.workUnit', 'substrates.name as substrateName',
      'substrates.smiles as substrateSmiles',
      'methods.name as method', 'methods.reagent as methodReagent'])
    .where('practicals.courseId', '=', id)
  if (scope.sectionIds) {
    const sectionIds = scope.sectionIds
    query = query.where((eb) => eb.exists(eb.selectFrom('practicalSessions').select('practicalSessions.id')
      .whereRef('practicalSessions.practicalId', '=', 'practicals.id').where('practicalSessions.sectionId', 'in', sectionIds)))
  }
  const rows = await query.orderBy('practicals.id').execute()
  const sessions = await practicalSessionViews(rows.map((r) => r.id), scope.sectionIds)
  const firstMeeting = (practicalId: number) => sessions.get(practicalId)?.[0]?.meetingDate ?? '9999-12-31'
  return rows
    .map((r) => {
      const mine = sessions.get(r.id) ?? []
      return {
        id: r.id,
        title: r.title,
        substrateSmiles: r.substrateSmiles,
        method: r.method,
        sectionIds: mine.map((s) => s.sectionId),
        meetingDates: mine.map((s) => s.meetingDate),
        substrateName: r.substrateName,
        methodReagent: r.methodReagent,
        workUnit: r.workUnit,
        timezone: scope.course.timezone,
        sessions: mine,
      }
    })
    .sort((a, b) => firstMeeting(a.id).localeCompare(firstMeeting(b.id)) || a.id - b.id)
})
