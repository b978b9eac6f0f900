import { idParamsSchema } from '#shared/types/fields'
import { practicalInputSchema, type PracticalDetail } from '#shared/types/practical'

// A new practical starts with the method's reagents and the substrate at a teaching-lab scale
// (shared/utils/procedure.ts, defaultItems); the instructor then edits the amounts.
export default defineEventHandler(async (event): Promise<PracticalDetail> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, practicalInputSchema)
  const { substrate, method } = await requireLibraryChoice(me, input)
  const items = asBadRequest(() => prefilledItems(substrate!, method!))

  const practicalId = await useDb().transaction().execute(async (trx) => {
    const row = await trx.insertInto('practicals').values({ courseId: id, ...input }).returning('id').executeTakeFirstOrThrow()
    await replacePracticalItems(trx, row.id, items)
    await audit(trx, event, { action: 'practical.create', entity: 'practical', entityId: row.id, after: { courseId: id, ...input, items } })
    return row.id
  })
  setResponseStatus(event, 201)
  return practicalDetail(await requirePracticalAccess(event, practicalId, 'manage'))
})
