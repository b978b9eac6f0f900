import { idParamsSchema } from '#shared/types/fields'
import { queueQuerySchema, type QueueResponse } from '#shared/types/review'

// The review queue of one practical: each work unit's latest version in the caller's sections,
// what needs attention first. Filters: ?section=, ?status=, ?flag= (a flag code, "outlier", or "any" for every run that needs attention).
export default defineEventHandler(async (event): Promise<QueueResponse> => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requireReviewerOf(event, id)
  const query = readQueryAs(event, queueQuerySchema)
  const chemistry = await practicalChemistry(scope.practical)
  const { rows, outliers } = await buildReviewQueue(scope, chemistry.keyFactor)
  const inSection = query.section ? rows.filter((r) => r.section.id === query.section) : rows
  const codes = new Map<string, number>()
  for (const row of inSection) for (const code of new Set(row.flags.map((f) => f.code))) codes.set(code, (codes.get(code) ?? 0) + 1)
  return {
    practical: queuePracticalOf(scope, chemistry),
    role: scope.role,
    sections: await reviewSectionsOf(scope),
    rows: inSection.filter((r) => (!query.status || r.status === query.status) && (!query.flag || (query.flag === 'any' ? r.attention > 0 : r.flags.some((f) => f.code === query.flag)))),
    counts: countQueueRows(inSection),
    flagCodes: [...codes].map(([code, count]) => ({ code, count })).sort((a, b) => a.code.localeCompare(b.code)),
    outliers: outliers.run,
  }
})
