import { idParamsSchema } from '#shared/types/fields'
import { practicalPatchSchema, type PracticalDetail } from '#shared/types/practical'
import type { ItemSpec } from '#shared/utils/procedure'

// Another substrate takes over the substrate row of the scale (the amount stays); another method
// replaces the reagent rows with that method's own, since the old reagents no longer apply.
export default defineEventHandler(async (event): Promise<PracticalDetail> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { practical } = await requirePracticalAccess(event, id, 'manage')
  const input = await readBodyAs(event, practicalPatchSchema)
  const substrateChanged = input.substrateId !== undefined && input.substrateId !== practical.substrateId
  const methodChanged = input.methodId !== undefined && input.methodId !== practical.methodId
  const { substrate, method } = await requireLibraryChoice(me, {
    substrateId: substrateChanged ? input.substrateId : undefined,
    methodId: methodChanged ? input.methodId : undefined,
  })

  await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('practicalItems').selectAll().where('practicalId', '=', id).orderBy('position').execute()
    let items: ItemSpec[] = before.map(({ id: _id, practicalId: _p, position: _pos, ...item }) => item)
    if (substrateChanged || methodChanged) {
      const newSubstrate = substrate ?? await trx.selectFrom('substrates').selectAll().where('id', '=', practical.substrateId).executeTakeFirstOrThrow()
      const newMethod = method ?? await trx.selectFrom('methods').selectAll().where('id', '=', practical.methodId).executeTakeFirstOrThrow()
      const fresh = asBadRequest(() => prefilledItems(newSubstrate, newMethod))
      const reagentRole = (r: string) => r === 'halogenating-agent' || r === 'initiator'
      if (substrateChanged) {
        const old = items.find((i) => i.role === 'substrate')
        items = items.map((i) => (i.role === 'substrate' ? { ...fresh[0]!, basis: old!.basis, amount: old!.amount } : i))
      }
      if (methodChanged) {
        const kept = items.filter((i) => !reagentRole(i.role))
        const at = Math.max(1, kept.findIndex((i) => i.role === 'substrate') + 1)
        items = [...kept.slice(0, at), ...fresh.filter((i) => reagentRole(i.role)), ...kept.slice(at)]
      }
      await replacePracticalItems(trx, id, items)
    }
    await trx.updateTable('practicals').set({ ...input, updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, event, {
      action: 'practical.update', entity: 'practical', entityId: id,
      before: { title: practical.title, substrateId: practical.substrateId, methodId: practical.methodId, workUnit: practical.workUnit, notes: practical.notes, ...(substrateChanged || methodChanged ? { items: before } : {}) },
      after: { ...input, ...(substrateChanged || methodChanged ? { items } : {}) },
    })
  })
  return practicalDetail(await requirePracticalAccess(event, id, 'manage'))
})
