// Reading an uploaded GC file and computing its result: parsing text, spreadsheets and netCDF,
// detecting and integrating peaks. Plain functions of the file's bytes; they run in the
// engine worker (server/engines/worker.ts), never on the request loop.
import type { StandardPeak } from '../../shared/types/library'
import { detectPeaks, parsePeakTable, parseTrace, sniffUpload } from '../../shared/utils/chromatography'
import { evaluateRun, RunInputError, type PracticalChemistry, type RunResult } from '../../shared/utils/submission'
import { readUploadContent, type RunSource } from '../../shared/utils/lib/upload-content'
import { packPeaks } from '../../shared/utils/lib/stored-peaks'

export interface EvaluatedUpload {
  run: RunResult
  /** What the original is kept as. */
  mediaType: string
}

/** A student's upload against their practical's chemistry; an unreadable file throws UploadFormatError or RunInputError. */
export async function evaluateUpload({ bytes, chemistry }: { bytes: Uint8Array, chemistry: PracticalChemistry }): Promise<EvaluatedUpload> {
  const content = await readUploadContent(bytes)
  const run = evaluateRun({ source: content.source, ...chemistry })
  return { run, mediaType: content.mediaType ?? (run.kind === 'trace' ? 'text/csv; profile=trace' : 'text/csv; profile=peak-table') }
}

/** A run as a new version stores it: the peaks packed (stored-peaks.ts), the rest as computed. */
export interface UploadToStore {
  run: Omit<RunResult, 'peaks'>
  storedPeaks: Uint8Array
  mediaType: string
}

/**
 * evaluateUpload for an upload that is stored, not shown: the thousands of peaks of a long table
 * are packed here, off the request loop, and cross back to it as one block of bytes.
 */
export async function evaluateUploadToStore(input: { bytes: Uint8Array, chemistry: PracticalChemistry }): Promise<UploadToStore> {
  const { run: { peaks, ...run }, mediaType } = await evaluateUpload(input)
  return { run, storedPeaks: packPeaks(peaks), mediaType }
}

// A standard run lists a handful of peaks (solvent, starting material, each product).
export const MAX_STANDARD_PEAKS = 200

export interface StandardRunPeaks {
  peaks: StandardPeak[]
  warnings: string[]
  mediaType: string
}

/**
 * A standard run's peaks, sorted by retention time: a peak table as read, or a trace (text or
 * netCDF) integrated. An unusable file throws UploadFormatError, or RunInputError with its rows.
 */
export async function standardRunPeaks(
  { bytes, expectedMaxMinutes }: { bytes: Uint8Array, expectedMaxMinutes?: number },
): Promise<StandardRunPeaks> {
  const content = await readUploadContent(bytes)
  const { peaks, warnings } = peaksOf(content.source, expectedMaxMinutes)
  return { peaks: [...peaks].sort((a, b) => a.retentionTime - b.retentionTime), warnings, mediaType: content.mediaType ?? 'text/plain' }
}

function peaksOf(source: RunSource, expectedMaxMinutes: number | undefined): { peaks: StandardPeak[], warnings: string[] } {
  const refuse = (errors: Array<{ row: number, message: string }>) => new RunInputError(errors[0]!.message, errors)
  const tooMany = (n: number) => {
    if (n > MAX_STANDARD_PEAKS) {
      throw refuse([{ row: 0, message: `The run has more than ${MAX_STANDARD_PEAKS} peaks; a standard run has a handful.` }])
    }
  }
  const integrated = (time: ArrayLike<number>, signal: ArrayLike<number>, warnings: string[]) => {
    const detected = detectPeaks({ time, signal })
    tooMany(detected.peaks.length)
    return {
      peaks: detected.peaks.map(({ retentionTime, area, height }) => ({ retentionTime, area, height })),
      warnings: [...warnings, ...detected.flags.map((f) => f.message)],
    }
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
