import { libraryIdParamsSchema, type StandardPeak, type StandardRunUploadResponse } from '#shared/types/library'
import { parsePeakTable } from '#shared/utils/chromatography'
import { suggestionsForRun } from '#shared/utils/windows'

// A standard run lists a handful of peaks (solvent, starting material, each product).
const MAX_STANDARD_PEAKS = 200

export default defineEventHandler(async (event): Promise<StandardRunUploadResponse> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, libraryIdParamsSchema)
  const { me } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const { file } = await readUpload(event)
  const windows = await useDb().selectFrom('substrateWindows').select(['kind', 'productSmiles', 'rtMin', 'rtMax'])
    .where('substrateId', '=', id).execute()
  const latest = Math.max(0, ...windows.map((w) => w.rtMax))
  const parsed = parsePeakTable(uploadAsText(file), { maxRows: MAX_STANDARD_PEAKS, ...(latest > 0 ? { expectedMaxMinutes: latest } : {}) })
  if (parsed.errors.length) {
    const first = parsed.errors[0]!
    throw createError({ statusCode: 422, statusMessage: `file: ${first.message}`, data: { errors: parsed.errors } })
  }
  const peaks: StandardPeak[] = parsed.peaks.sort((a, b) => a.retentionTime - b.retentionTime)
  const runId = await useDb().transaction().execute(async (trx) => {
    const fileId = await storeFile(trx, file, me.id, 'text/plain')
    const run = await trx.insertInto('standardRuns').values({ substrateId: id, fileId, peaks: JSON.stringify(peaks), createdBy: me.id })
      .returning('id').executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'substrate.standard-run', entity: 'substrate', entityId: id, after: { standardRunId: run.id, fileId, sha256: file.sha256, peaks: peaks.length } })
    return run.id
  })
  setResponseStatus(event, 201)
  return {
    id: runId,
    fileName: file.name,
    sha256: file.sha256,
    peaks,
    suggestions: suggestionsForRun(peaks, windows),
    warnings: parsed.warnings,
  }
})
