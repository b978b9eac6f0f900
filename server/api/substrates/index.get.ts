import type { SubstrateListItem } from '#shared/types/library'
import { libraryScope, libraryUsage, requireLibraryReader, toSubstrateListItem } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<SubstrateListItem[]> => {
  const me = requireLibraryReader(event)
  const courseIds = await visibleCourseIds(me)
  const rows = await useDb().selectFrom('substrates').selectAll('substrates')
    .select((eb) => eb.selectFrom('substrateWindows').select(eb.fn.countAll<number>().as('n'))
      .whereRef('substrateWindows.substrateId', '=', 'substrates.id').as('windowCount'))
    .where(libraryScope(me, courseIds, 'substrates'))
    .orderBy('name').orderBy('id')
    .execute()
  const usage = await libraryUsage('substrates', rows.map((r) => r.id))
  return rows.map(({ windowCount, ...row }) => toSubstrateListItem(row, me,
    { windowCount: Number(windowCount ?? 0), usedBy: usage.get(row.id) ?? 0 }))
})
