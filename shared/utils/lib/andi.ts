// Raw chromatograms in the open interchange format for chromatography: ANDI/AIA (ASTM E1947),
// a netCDF classic file. What is read, as the AIA chromatography template names it:
// - the detector signal `ordinate_values(point_number)`;
// - its time axis from the scalar variables `actual_delay_time` and `actual_sampling_interval`
//   (`actual_run_time_length` when the interval is missing), or point by point from
//   `raw_data_retention(point_number)` when the file has it (non-uniform sampling);
// - times in the unit of the global attribute `retention_unit` ("Seconds" in practice);
// - a peak table the instrument stored: `peak_retention_time(peak_number)`, `peak_area`, and
//   `peak_height` when present. The AIA templates write -9999 for "no value".
// netCDF classic itself (header, then big-endian data) is read by netcdfjs.
import { NetCDFReader } from 'netcdfjs'
import type { Peak, RowError } from './peak-table'
import { MAX_TRACE_POINTS } from './trace-table'

export type AndiContent =
  | { kind: 'trace', time: number[], signal: number[], warnings: string[] }
  | { kind: 'peaks', peaks: Peak[], warnings: string[] }

/** The file cannot be used: a sentence for the 422, and the stored peaks at fault when there are. */
export class AndiFileError extends Error {
  constructor(message: string, readonly rows: RowError[] = []) {
    super(message)
    this.name = 'AndiFileError'
  }
}

/** The templates' "no value" for numbers. */
const MISSING = -9999
const NUMERIC_TYPES = new Set(['byte', 'short', 'int', 'float', 'double'])
const MAX_PEAKS = 5000

type Variable = NetCDFReader['header']['variables'][number]

/** Minutes per unit of `retention_unit`; null for a unit this reader does not know. */
function minutesPer(unit: string): number | null {
  const u = unit.trim().toLowerCase().replace(/\0+$/, '')
  if (/^(s|sec|secs|second|seconds)$/.test(u)) return 1 / 60
  if (/^(min|mins|minute|minutes)$/.test(u)) return 1
  if (/^(ms|msec|millisecond|milliseconds)$/.test(u)) return 1 / 60000
  return null
}

const isValue = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v) && v !== MISSING

class AndiReader {
  readonly nc: NetCDFReader
  // netcdfjs leaves a list out of its header when the file says it is absent.
  readonly variables: Variable[]
  readonly dimensions: NetCDFReader['dimensions']
  constructor(readonly bytes: Uint8Array) {
    try {
      this.nc = new NetCDFReader(bytes)
    } catch {
      throw new AndiFileError('the netCDF header cannot be read: the file is damaged or cut short. Export it again.')
    }
    this.variables = this.nc.header.variables ?? []
    this.dimensions = this.nc.header.dimensions ?? []
    this.nc.header.globalAttributes ??= []
  }

  variable(name: string): Variable | undefined {
    return this.variables.find((v) => v.name === name)
  }

  dimensionSize(name: string): number | null {
    return this.dimensions.find((d) => d.name === name)?.size ?? null
  }

  /** A numeric variable's values, checked against the file's length before netcdfjs reads them. */
  numbers(v: Variable): number[] {
    if (!NUMERIC_TYPES.has(v.type)) throw new AndiFileError(`the variable ${v.name} is not numeric.`)
    const { recordStep = 0, length: records } = this.nc.recordDimension
    const end = v.record ? v.offset + Math.max(0, records - 1) * recordStep + v.size : v.offset + v.size
    if (end > this.bytes.length) throw new AndiFileError(`the file is cut short: ${v.name} ends past the last byte. Export it again.`)
    let raw: unknown[]
    try {
      raw = this.nc.getDataVariable(v) as unknown[]
    } catch {
      throw new AndiFileError(`the data of ${v.name} cannot be read: the file is damaged.`)
    }
    // vsize is padded to 4 bytes, so netcdfjs may hand back a padding value: keep the dimensions' count.
    const count = v.dimensions.reduce((n, id) => n * (id === this.nc.recordDimension.id ? records : this.dimensions[id]?.size ?? 0), 1)
    return (raw.flat() as number[]).slice(0, count)
  }

  /** A scalar stored as a variable (as the template has it) or, in some files, a global attribute. */
  scalar(name: string): number | null {
    const v = this.variable(name)
    const value = v ? this.numbers(v)[0] : this.nc.getAttribute(name)
    return isValue(value) ? value : null
  }

  text(name: string): string | null {
    const value = this.nc.getAttribute(name)
    return typeof value === 'string' ? value.replace(/\0+$/, '').trim() : null
  }
}

function retentionFactor(reader: AndiReader, warnings: string[]): number {
  // Some writers spell it in the plural.
  const unit = reader.text('retention_unit') ?? reader.text('retention_units')
  if (!unit) {
    warnings.push('The file does not say its time unit (retention_unit); seconds were assumed, as ANDI files use.')
    return 1 / 60
  }
  const factor = minutesPer(unit)
  // Echoed in the answer's status line: printable ASCII only.
  if (factor === null) throw new AndiFileError(`the time unit "${unit.slice(0, 20).replace(/[^\x20-\x7e]/g, '?')}" (retention_unit) is not seconds or minutes.`)
  return factor
}

function storedPeaks(reader: AndiReader, factor: number): Peak[] | null {
  const count = reader.dimensionSize('peak_number')
  const rtVar = reader.variable('peak_retention_time')
  const areaVar = reader.variable('peak_area')
  if (!count || !rtVar || !areaVar) return null
  if (count > MAX_PEAKS) throw new AndiFileError(`the file's peak table has more than ${MAX_PEAKS} peaks.`)
  const rts = reader.numbers(rtVar)
  const areas = reader.numbers(areaVar)
  const heightVar = reader.variable('peak_height')
  const heights = heightVar ? reader.numbers(heightVar) : []
  if (rts.length < count || areas.length < count) throw new AndiFileError('the file\'s peak table is shorter than its peak_number says.')
  const errors: RowError[] = []
  const peaks: Peak[] = []
  for (let i = 0; i < count; i++) {
    const label = `Peak ${i + 1} of the file's peak table`
    const rt = rts[i]
    const area = areas[i]
    if (!isValue(rt)) errors.push({ row: i + 1, code: 'non-numeric', message: `${label}: the retention time is missing.` })
    else if (rt < 0) errors.push({ row: i + 1, code: 'negative-value', message: `${label}: the retention time ${rt} is negative.` })
    if (!isValue(area)) errors.push({ row: i + 1, code: 'non-numeric', message: `${label}: the area is missing.` })
    else if (area < 0) {
      errors.push({
        row: i + 1,
        code: 'negative-value',
        message: `${label}: the area ${area} is negative; re-integrate the peak or check the baseline.`,
      })
    }
    if (!isValue(rt) || !isValue(area) || rt < 0 || area < 0) continue
    const peak: Peak = { retentionTime: rt * factor, area, row: i + 1 }
    if (isValue(heights[i])) peak.height = heights[i]
    peaks.push(peak)
  }
  if (errors.length) throw new AndiFileError(errors[0]!.message, errors)
  return peaks
}

function timeAxis(reader: AndiReader, points: number, factor: number, warnings: string[]): number[] {
  const retention = reader.variable('raw_data_retention')
  if (retention) {
    const values = reader.numbers(retention)
    if (values.length !== points) throw new AndiFileError('raw_data_retention and ordinate_values have different lengths.')
    return values.map((t) => t * factor)
  }
  const runLength = reader.scalar('actual_run_time_length')
  let interval = reader.scalar('actual_sampling_interval')
  if (interval === null && runLength !== null) interval = runLength / points
  if (interval === null || !(interval > 0)) {
    throw new AndiFileError('the file gives no time axis: actual_sampling_interval is missing or not positive.')
  }
  let delay = reader.scalar('actual_delay_time')
  if (delay === null) {
    warnings.push('The file gives no delay time (actual_delay_time); the trace was taken to start at 0.')
    delay = 0
  }
  // The run length is the points times the interval; a large mismatch means one of them is off.
  if (runLength !== null && runLength > 0 && Math.abs(points * interval - runLength) > Math.max(2 * interval, 0.05 * runLength)) {
    warnings.push(
      `The file's run length (${runLength}) does not match its ${points} points at ${interval} each; the time axis follows the sampling interval.`,
    )
  }
  const time = new Array<number>(points)
  for (let i = 0; i < points; i++) time[i] = (delay + i * interval) * factor
  return time
}

/**
 * Reads an ANDI/AIA chromatography file: its stored peak table when it has one (used as is,
 * retention times in minutes), else the detector trace (time in minutes, signal) for the
 * project's own integration.
 */
export function readAndiChromatogram(bytes: Uint8Array): AndiContent {
  const reader = new AndiReader(bytes)
  const warnings: string[] = []
  const factor = retentionFactor(reader, warnings)
  const peaks = storedPeaks(reader, factor)
  if (peaks) {
    if (!peaks.length) throw new AndiFileError('the file\'s peak table has no peaks.')
    warnings.unshift(
      `The file holds the instrument's own peak table (${peaks.length} peaks): it was used as stored, not integrated again here.`,
    )
    return { kind: 'peaks', peaks, warnings }
  }
  const signalVar = reader.variable('ordinate_values')
  if (!signalVar) {
    throw new AndiFileError(
      'the file holds neither a detector trace (ordinate_values) nor a peak table (peak_retention_time, peak_area).',
    )
  }
  const signal = reader.numbers(signalVar)
  if (signal.length > MAX_TRACE_POINTS) throw new AndiFileError(`the trace has more than ${MAX_TRACE_POINTS} points.`)
  if (signal.length < 10) throw new AndiFileError('the trace has fewer than 10 points.')
  const bad = signal.findIndex((y) => !isValue(y))
  if (bad >= 0) throw new AndiFileError(`point ${bad + 1} of the trace has no value.`)
  const time = timeAxis(reader, signal.length, factor, warnings)
  for (let i = 1; i < time.length; i++) {
    if (!(time[i]! > time[i - 1]!)) throw new AndiFileError(`the time does not increase at point ${i + 1} of the trace.`)
  }
  return { kind: 'trace', time, signal, warnings }
}
