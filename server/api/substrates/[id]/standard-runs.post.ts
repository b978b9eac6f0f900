import { libraryIdParamsSchema, type StandardPeak, type StandardRunUploadResponse } from '#shared/types/library'
import { detectPeaks, parsePeakTable, parseTrace, sniffUpload } from '#shared/utils/chromatography'
import type { RunSource } from '#shared/utils/lib/upload-content'
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
  const content = await uploadContent(file)
  const { peaks, warnings } = standardRunPeaks(content.source, latest > 0 ? latest : undefined)
  peaks.sort((a, b) => a.retentionTime - b.retentionTime)
  const runId = await useDb().transaction().execute(async (trx) => {
    const fileId = await storeFile(trx, file, me.id, content.mediaType ?? 'text/plain')
    const run = await trx.insertInto('standardRuns').values({ substrateId: id, fileId, peaks: JSON.stringify(peaks), createdBy: me.id })
      .returning('id').executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'substrate.standard-run', entity: 'substrate', entityId: id, after: { standardRunId: run.id, fileId, sha256: file.sha256, peaks: peaks.length } })
    return run.id
  })
  setResponseStatus(event, 201)
  return { id: runId, fileName: file.name, sha256: file.sha256, peaks, suggestions: suggestionsForRun(peaks, windows), warnings }
})

/** The run's peaks: a peak table as read, or a trace (text or netCDF) integrated; 422 with the rows otherwise. */
function standardRunPeaks(source: RunSource, expectedMaxMinutes: number | undefined): { peaks: StandardPeak[], warnings: string[] } {
  const refuse = (errors: Array<{ row: number, message: string }>) => createError({ statusCode: 422, statusMessage: `file: ${errors[0]!.message}`, data: { errors } })
  const tooMany = (n: number) => {
    if (n > MAX_STANDARD_PEAKS) throw refuse([{ row: 0, message: `The run has more than ${MAX_STANDARD_PEAKS} peaks; a standard run has a handful.` }])
  }
  const integrated = (time: ArrayLike<number>, signal: ArrayLike<number>, warnings: string[]) => {
    const detected = detectPeaks({ time, signal })
    tooMany(detected.peaks.length)
    return { peaks: detected.peaks.map(({ retentionTime, area, height }) => ({ retentionTime, area, height })), warnings: [...warnings, ...detected.flags.map((f) => f.message)] }
  }
  if (source.kind === 'peaks') {
    tooMany(source.peaks.length)
    return { peaks: source.peaks, warnings: source.warnings ?? [] }
  }
  if (source.kind === 'trace') return integrated(source.time, source.signal, source.warnings ?? [])
  const options = { maxRows: MAX_STANDARD_PEAKS, ...(expectedMaxMinutes ? { expectedMaxMinutes } : {}) }
  if (sniffUpload(source.text).kind === 'trace') {
    const trace = parseTrace(source.text, options)
    if (trace.errors.length) throw refuse(trace.errors)
    return integrated(trace.time, trace.signal, [...source.warnings ?? [], ...trace.warnings])
  }
  const parsed = parsePeakTable(source.text, options)
  if (parsed.errors.length) throw refuse(parsed.errors)
  return { peaks: parsed.peaks, warnings: [...source.warnings ?? [], ...parsed.warnings] }
}
