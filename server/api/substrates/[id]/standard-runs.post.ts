import { idParamsSchema } from '#shared/types/fields'
import type { StandardRunUploadResponse } from '#shared/types/library'
import { RunInputError } from '#shared/utils/submission'
import { suggestionsForRun } from '#shared/utils/windows'
import { addStandardRun, requireLibraryEntry } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<StandardRunUploadResponse> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  await requireLibraryEntry(event, 'substrates', id, 'edit')
  const { file } = await readUpload(event)
  const windows = await useDb().selectFrom('substrateWindows').select(['kind', 'productSmiles', 'rtMin', 'rtMax'])
    .where('substrateId', '=', id).execute()
  const latest = Math.max(0, ...windows.map((w) => w.rtMax))
  const { peaks, warnings, mediaType } = await standardRunPeaksOf(file.bytes, latest > 0 ? latest : undefined)
  const runId = await addStandardRun(useDb(), actorOf(event), id, file, { peaks, mediaType })
  setResponseStatus(event, 201)
  return { id: runId, fileName: file.name, sha256: file.sha256, peaks, suggestions: suggestionsForRun(peaks, windows), warnings }
})

/** The run's peaks, read in the engine worker (server/engines/uploads.ts); 415 or 422 with the rows otherwise. */
async function standardRunPeaksOf(fileBytes: Buffer, expectedMaxMinutes: number | undefined) {
  const bytes = new Uint8Array(fileBytes)
  try {
    return await runEngine('standardRunPeaks', { bytes, expectedMaxMinutes }, { field: 'file', transfer: [bytes.buffer] })
  } catch (error) {
    if (error instanceof RunInputError) throw createError({ statusCode: 422, statusMessage: `file: ${error.message}`,
      data: { errors: error.rows } })
    throw asUploadFormatError(error)
  }
}
