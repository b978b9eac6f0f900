import { idParamsSchema } from '#shared/types/fields'
import { computeRun, previewOf, studentUnit } from '../../../../services/submissions'
// The same computation as an upload, shown before the student confirms; nothing is stored.
export default defineEventHandler(async (event) => {
  requireRole(event, 'student')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id)
  const unit = await studentUnit(useDb(), scope)
  const { file } = await readUpload(event)
  const { run, chemistry } = await computeRun(scope, file)
  return previewOf(run, chemistry, unit.uploadDueAt !== null && Date.now() > unit.uploadDueAt.getTime())
})
