import { reviewIdParamsSchema } from '#shared/types/review'

// The original uploaded bytes, exactly as stored, as a download: for the staff who review the
// submission and for the members of its work unit. Never rendered inline.
export default defineEventHandler(async (event) => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, reviewIdParamsSchema)
  if (me.role === 'coordinator') throw createError({ statusCode: 403, statusMessage: 'Submissions are for the course’s instructors, TAs and students' })
  if (me.role === 'student') {
    if (!(await isReviewUnitMember(me.id, id))) throw createError({ statusCode: 403, statusMessage: 'Students may download only their own work unit’s files' })
  } else {
    await requireReviewableSubmission(event, id)
  }
  const file = await useDb().selectFrom('submissions').innerJoin('files', 'files.id', 'submissions.fileId')
    .select(['submissions.version', 'files.originalName', 'files.content'])
    .where('submissions.id', '=', id).executeTakeFirstOrThrow()
  setReviewDownloadHeaders(event, `submission-${id}-v${file.version}-${reviewSafeFileName(file.originalName, 'upload.txt')}`, 'text/plain')
  return file.content
})
