import { idParamsSchema } from '#shared/types/fields'
import { rosterUploadFieldsSchema, type RosterImportResult } from '#shared/types/roster'
import { confirmedIdChanges, importRoster } from '~~/server/services/roster'

// The whole file or nothing (importRoster); every row is checked again there.
export default defineEventHandler(async (event): Promise<RosterImportResult> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const upload = await readUpload(event)
  const { confirmConflicts, replaceStudentIds } = validate(rosterUploadFieldsSchema, upload.fields)
  const ctx = { course, me, appUrl: useRuntimeConfig(event).public.appUrl }
  const replaceIds = confirmedIdChanges(replaceStudentIds)
  const result = await importRoster(useDb(), actorOf(event), ctx, upload, confirmConflicts === 'true', replaceIds)
  setResponseStatus(event, 201)
  return result
})
