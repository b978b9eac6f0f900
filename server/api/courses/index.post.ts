import { courseInputSchema, DEFAULT_RUBRIC, type CourseListItem } from '#shared/types/course'

export default defineEventHandler(async (event): Promise<CourseListItem> => {
  const me = requireRole(event, 'instructor')
  const input = await readBodyAs(event, courseInputSchema)
  const course = await useDb().transaction().execute(async (trx) => {
    const clash = await trx.selectFrom('courses').select('id').where('code', '=', input.code).where('term', '=', input.term).executeTakeFirst()
    if (clash) invalid([{ field: 'code', message: `${input.code} already exists for ${input.term}` }], 409)
    const row = await trx.insertInto('courses')
      .values({ ...input, rubric: JSON.stringify(DEFAULT_RUBRIC), createdBy: me.id })
      .returning(['id', 'code', 'title', 'term']).executeTakeFirstOrThrow()
    await trx.insertInto('courseOwners').values({ courseId: row.id, userId: me.id }).execute()
    await audit(trx, event, { action: 'course.create', entity: 'course', entityId: row.id, after: input })
    return row
  })
  setResponseStatus(event, 201)
  return course
})
