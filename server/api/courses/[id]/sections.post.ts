import { idParamsSchema } from '#shared/types/fields'
import { sectionInputSchema } from '#shared/types/section'
import { candidateRow, checkTaIds, refuseUnconfirmedConflicts, sectionValues, sectionViews } from '~~/server/services/sections'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, sectionInputSchema)
  await checkTaIds(input.taIds)
  const taken = await useDb().selectFrom('sections').select('id').where('courseId', '=', id).where('code', '=', input.code).executeTakeFirst()
  if (taken) invalid([{ field: 'code', message: `Section ${input.code} already exists in this course` }], 409)
  const conflicts = await refuseUnconfirmedConflicts(candidateRow(0, course, input, 0), input.confirmConflicts)

  const section = await useDb().transaction().execute(async (trx) => {
    const row = await trx.insertInto('sections').values({ courseId: id, ...sectionValues(input) }).returning('id').executeTakeFirstOrThrow()
    if (input.taIds.length) await trx.insertInto('sectionTas').values(input.taIds.map((userId) => ({ sectionId: row.id, userId }))).execute()
    await audit(trx, event, { action: 'section.create', entity: 'section', entityId: row.id, after: { ...sectionValues(input), taIds: input.taIds, confirmedConflicts: conflicts.map((c) => c.message) } })
    return row
  })
  setResponseStatus(event, 201)
  const [view] = await sectionViews({ ids: [section.id] })
  return { section: view!, conflicts }
})
