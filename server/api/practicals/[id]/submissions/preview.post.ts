import { idParamsSchema } from '#shared/types/fields'
import { computeRun, previewOf, studentUnit, uploadColumns } from '../../../../services/submissions'
// The same computation as an upload, shown before the student confirms; nothing is stored.
export default defineEventHandler(async (event) => {
  requireRole(event, 'student')
  const { id } = readParamsAs(event, idParamsSchema)
  // The body is read while the caller's access is checked; a refusal of access still comes first.
  const upload = readUpload(event)
  upload.catch(() => {})
  const { scope, columns: read } = await requirePracticalAccessWith(event, id, uploadColumns)
  const unit = await studentUnit(useDb(), scope, read.enrolment)
  const { file } = await upload
  const { run, chemistry } = await computeRun(file, read.chemistry)
  return previewOf(run, chemistry, unit.uploadDueAt !== null && Date.now() > unit.uploadDueAt.getTime())
})
