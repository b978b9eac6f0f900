import { idParamsSchema } from '#shared/types/fields'
import { sectionInputSchema } from '#shared/types/section'
import { candidateRow, checkTaIds, refuseUnconfirmedConflicts, sectionValues, sectionViews } from '~~/server/services/sections'

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course, section } = await requireSectionAccess(event, id, 'manage')
  const input = await readBodyAs(event, sectionInputSchema)
  await checkTaIds(input.taIds)
  const taken = await useDb().selectFrom('sections').select('id').where('courseId', '=', course.id).where('code', '=', input.code).where('id', '<>', id).executeTakeFirst()
  if (taken) invalid([{ field: 'code', message: `Section ${input.code} already exists in this course` }], 409)
  const [before] = await sectionViews({ ids: [id] })
  const conflicts = await refuseUnconfirmedConflicts(candidateRow(id, course, input, before!.enrolled), input.confirmConflicts)

  await useDb().transaction().execute(async (trx) => {
    await trx.updateTable('sections').set({ ...sectionValues(input), updatedAt: new Date() }).where('id', '=', section.id).execute()
    await trx.deleteFrom('sectionTas').where('sectionId', '=', id).execute()
    if (input.taIds.length) await trx.insertInto('sectionTas').values(input.taIds.map((userId) => ({ sectionId: id, userId }))).execute()
    const { meetings: _m, enrolled: _e, ...beforeFields } = before!
    await audit(trx, event, {
      action: 'section.update', entity: 'section', entityId: id,
      before: { ...beforeFields, taIds: before!.tas.map((t) => t.id) },
      after: { ...sectionValues(input), taIds: input.taIds, confirmedConflicts: conflicts.map((c) => c.message) },
    })
  })
  const [view] = await sectionViews({ ids: [id] })
  return { section: view!, conflicts }
})
