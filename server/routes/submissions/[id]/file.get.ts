import { idParamsSchema } from '#shared/types/fields'
import { NETCDF_MEDIA_TYPE, XLSX_MEDIA_TYPE } from '#shared/utils/lib/upload-content'
import {
  isReviewUnitMember, requireReviewableSubmission, reviewSafeFileName, setReviewDownloadHeaders, submissionFile,
} from '../../../services/review'

// What a download is served as, by what the upload was read as: text stays text/plain (its bytes,
// whatever their encoding, are sent as they came), workbooks and netCDF keep their own types.
const DOWNLOAD_TYPES = [
  { type: XLSX_MEDIA_TYPE, fallback: 'upload.xlsx' },
  { type: NETCDF_MEDIA_TYPE, fallback: 'upload.cdf' },
]

// The original uploaded bytes, exactly as stored, as a download: for the staff who review the
// submission and for the members of its work unit. Never rendered inline.
export default defineEventHandler(async (event) => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  if (me.role === 'coordinator') {
    throw createError({ statusCode: 403, statusMessage: 'Submissions are for the course’s instructors, TAs and students' })
  }
  if (me.role === 'student') {
    if (!(await isReviewUnitMember(me.id, id))) {
      throw createError({ statusCode: 403, statusMessage: 'Students may download only their own work unit’s files' })
    }
  } else {
    await requireReviewableSubmission(event, id)
  }
  const file = await submissionFile(id)
  const kind = DOWNLOAD_TYPES.find((t) => t.type === file.mediaType) ?? { type: 'text/plain', fallback: 'upload.txt' }
  const name = `submission-${id}-v${file.version}-${reviewSafeFileName(file.originalName, kind.fallback)}`
  setReviewDownloadHeaders(event, name, kind.type)
  return file.content
})
