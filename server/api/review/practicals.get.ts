import type { ReviewPracticalItem } from '#shared/types/review'

// The practicals the caller reviews (owned courses; a TA's sections), with queue counts.
export default defineEventHandler(async (event): Promise<ReviewPracticalItem[]> => {
  const me = requireRole(event, 'instructor', 'ta')
  const db = useDb()
  const candidates = me.role === 'instructor'
    ? await db.selectFrom('practicals').innerJoin('courseOwners', 'courseOwners.courseId', 'practicals.courseId')
      .select('practicals.id').where('courseOwners.userId', '=', me.id).orderBy('practicals.id').execute()
    : await db.selectFrom('practicals').innerJoin('practicalSessions', 'practicalSessions.practicalId', 'practicals.id')
      .innerJoin('sectionTas', 'sectionTas.sectionId', 'practicalSessions.sectionId')
      .select('practicals.id').distinct().where('sectionTas.userId', '=', me.id).orderBy('practicals.id').execute()
  const items: ReviewPracticalItem[] = []
  for (const { id } of candidates) {
    const scope = await requireReviewerOf(event, id)
    const chemistry = await practicalChemistry(scope.practical)
    const { rows } = await buildReviewQueue(scope, chemistry.keyFactor)
    items.push({
      id,
      title: scope.practical.title,
      course: { id: scope.course.id, code: scope.course.code, title: scope.course.title },
      sections: (await reviewSectionsOf(scope)).map((s) => s.code),
      counts: countQueueRows(rows),
    })
  }
  return items
})
