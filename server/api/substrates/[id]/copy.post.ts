import { idParamsSchema } from '#shared/types/fields'
import { type SubstrateDetail } from '#shared/types/library'
import { copyName, requireLibraryEntry, substrateDetail } from '~~/server/services/library'

// A shared (or co-owner's) entry becomes the caller's own: windows, standard runs, product
// names and reference distributions included.
export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  const me = requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { row: original } = await requireLibraryEntry(event, 'substrates', id, 'read')
  const row = await useDb().transaction().execute(async (trx) => {
    const { id: _id, createdAt: _c, updatedAt: _u, ...fields } = original
    const copy = await trx.insertInto('substrates').values({ ...fields, name: copyName(original.name), ownerId: me.id })
      .returningAll().executeTakeFirstOrThrow()
    const windows = await trx.selectFrom('substrateWindows').select(['kind', 'productSmiles', 'label', 'rtMin', 'rtMax', 'responseFactor'])
      .where('substrateId', '=', id).execute()
    if (windows.length) await trx.insertInto('substrateWindows').values(windows.map((w) => ({ ...w, substrateId: copy.id }))).execute()
    const runs = await trx.selectFrom('standardRuns').select(['fileId', 'peaks', 'createdBy', 'createdAt']).where('substrateId', '=', id).execute()
    if (runs.length) {
      await trx.insertInto('standardRuns')
        .values(runs.map((r) => ({ ...r, peaks: JSON.stringify(r.peaks), substrateId: copy.id }))).execute()
    }
    const names = await trx.selectFrom('substrateProductNames').select(['productSmiles', 'name']).where('substrateId', '=', id).execute()
    if (names.length) await trx.insertInto('substrateProductNames').values(names.map((n) => ({ ...n, substrateId: copy.id, updatedBy: me.id }))).execute()
    const references = await trx.selectFrom('substrateReferences').select(['reagent', 'percents', 'source', 'sourceKind']).where('substrateId', '=', id).execute()
    if (references.length) {
      await trx.insertInto('substrateReferences')
        .values(references.map((r) => ({ ...r, percents: JSON.stringify(r.percents), substrateId: copy.id, updatedBy: me.id }))).execute()
    }
    await audit(trx, event, { action: 'substrate.copy', entity: 'substrate', entityId: copy.id, after: { copiedFrom: id, name: copy.name, windows: windows.length, standardRuns: runs.length, names: names.length, references: references.length } })
    return copy
  })
  setResponseStatus(event, 201)
  return substrateDetail(row, me)
})
