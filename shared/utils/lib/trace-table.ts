// Raw detector traces (time, signal) as text, and telling a trace from a peak table.
import { type TimeUnit, classifyHeader, timeUnitOf } from './header-names'
import { type ColumnStyle, type ReadProblem, decideStyles, excerpt, looksNumeric, readCell } from './number-text'
import { readPlain, tallyCells } from './plain-number'
import {
  type RowError, type TableMeta, type PeakTableOptions,
  MAX_PEAK_AREA, MAX_RETENTION_MINUTES, chooseTimeUnit, describeProblem, findHeader, toMinutes,
} from './peak-table'
import { type Delimiter, SEPARATOR_LINE, mergeHeaderTokens, splitCells, splitLines, splitTexts, mayExceed } from './table-text'

export interface TraceOptions {
  timeUnit?: PeakTableOptions['timeUnit']
  expectedMaxMinutes?: number
  maxPoints?: number
  maxBytes?: number
}

export interface ParsedTrace {
  /** Minutes, strictly increasing. */
  time: number[]
  signal: number[]
  warnings: string[]
  errors: RowError[]
  meta: (Omit<TableMeta, 'headerRow' | 'columns' | 'areaSource'> & { headerRow: number | null, firstDataRow: number }) | null
}

export const MAX_TRACE_POINTS = 1_000_000
export const MAX_TRACE_BYTES = 50_000_000
/** Fewer rows than this is a table, not a detector trace (common practice: traces hold thousands). */
export const MIN_TRACE_POINTS = 200
const MAX_ERRORS = 100
/** Rows read to decide each column's decimal mark. */
const STYLE_SAMPLE = 5000

function numericCells(line: string, d: Delimiter): number {
  const cells = splitCells(line, d)
  if (cells.length < 2) return 0
  return cells.every((c) => c.text === '' || looksNumeric(c.text)) ? cells.filter((c) => c.text !== '').length : 0
}

/** How many non-blank lines follow line i, counting no further than `enough`. */
function filledAfter(lines: string[], i: number, enough: number): number {
  let n = 0
  for (let j = i + 1; j < lines.length && n < enough; j++) if (lines[j]!.trim() !== '') n++
  return n
}

/** First line from which three consecutive non-blank lines share a delimiter with ≥ 2 numbers each. */
function findDataStart(lines: string[]): { index: number, delimiter: Delimiter } | null {
  for (let i = 0; i < Math.min(lines.length, 500); i++) {
    if (lines[i]!.trim() === '') continue
    for (const d of ['\t', ';', ',', 'whitespace'] as const) {
      const count = numericCells(lines[i]!, d)
      if (count < 2) continue
      let ok = 0
      for (let j = i + 1; j < lines.length && ok < 2; j++) {
        if (lines[j]!.trim() === '') continue
        if (numericCells(lines[j]!, d) !== count) break
        ok++
      }
      if (ok >= Math.min(2, filledAfter(lines, i, 2))) return { index: i, delimiter: d }
    }
  }
  return null
}

function headerAbove(lines: string[], start: number, delimiter: Delimiter) {
  for (let i = start - 1; i >= 0; i--) {
    const line = lines[i]!
    if (line.trim() === '' || SEPARATOR_LINE.test(line)) continue
    const cells = delimiter === 'whitespace' ? mergeHeaderTokens(splitCells(line, delimiter)) : splitCells(line, delimiter)
    if (cells.length < 2 || cells.some((c) => looksNumeric(c.text))) return null
    return { row: i + 1, names: cells.map((c) => classifyHeader(c.text)) }
  }
  return null
}

/** One filled cell that is not a number: a label or a note between the rows. */
function loneText(cells: string[]): boolean {
  let filled = -1
  for (let k = 0; k < cells.length; k++) {
    if (cells[k] === '') continue
    if (filled >= 0) return false
    filled = k
  }
  return filled >= 0 && !looksNumeric(cells[filled]!)
}

/** A row's time and signal (plain decimals straight away, anything else through readCell), or the row's error. */
function readPoint(
  row: number, tRaw: string, timeStyle: ColumnStyle, yRaw: string, signalStyle: ColumnStyle,
): { t: number, y: number } | RowError {
  const tPlain = readPlain(tRaw, timeStyle)
  const yPlain = readPlain(yRaw, signalStyle)
  if (tPlain !== undefined && yPlain !== undefined) return { t: tPlain, y: yPlain }
  const t = tPlain === undefined ? readCell(tRaw, timeStyle) : { value: tPlain }
  const y = yPlain === undefined ? readCell(yRaw, signalStyle) : { value: yPlain }
  if (t === null || y === null) return { row, code: 'non-numeric', message: `Row ${row}: the time and signal must both be numbers.` }
  if ('problem' in t || 'problem' in y) {
    const [what, raw, problem] = 'problem' in t
      ? ['time', tRaw, t.problem] as const
      : ['signal', yRaw, (y as { problem: ReadProblem }).problem] as const
    return {
      row,
      code: problem.kind === 'ambiguous' ? 'ambiguous-number' : 'non-numeric',
      message: `Row ${row}: ${describeProblem(what, raw, problem)}.`,
    }
  }
  return { t: t.value, y: y.value }
}

/** Reads a two-column (or wider) time/signal trace; tolerates preambles, BOM, decimal commas and footers. */
export function parseTrace(text: string, options: TraceOptions = {}, split?: string[]): ParsedTrace {
  const warnings: string[] = []
  const refuse = (row: number, code: RowError['code'], message: string): ParsedTrace => (
    { time: [], signal: [], warnings, errors: [{ row, code, message }], meta: null }
  )
  const maxBytes = options.maxBytes ?? MAX_TRACE_BYTES
  if (typeof text !== 'string' || text.trim() === '') return refuse(0, 'empty', 'The file is empty.')
  if (mayExceed(text, maxBytes)) {
    return refuse(0, 'too-large', `The trace file is larger than ${Math.round(maxBytes / 1e6)} MB.`)
  }
  const lines = split ?? splitLines(text)
  const start = findDataStart(lines)
  if (!start) return refuse(0, 'no-header', 'No rows with a time and a signal value were found.')
  const header = headerAbove(lines, start.index, start.delimiter)
  const timeIdx = Math.max(0, header?.names.findIndex((n) => n.kind === 'rt') ?? 0)
  const signalByName = header?.names.findIndex((n, i) => i !== timeIdx && (n.kind === 'signal' || n.kind === 'height')) ?? -1
  const signalIdx = signalByName >= 0 ? signalByName : timeIdx === 0 ? 1 : 0
  // The decimal mark is decided on the first rows; a later cell that contradicts it is refused.
  const timeSample: string[] = []
  const signalSample: string[] = []
  for (let i = start.index; i < lines.length && timeSample.length < STYLE_SAMPLE; i++) {
    const cells = splitTexts(lines[i]!, start.delimiter)
    timeSample.push(cells[timeIdx] ?? '')
    signalSample.push(cells[signalIdx] ?? '')
  }
  const [timeStyle, signalStyle] = decideStyles([tallyCells(timeSample), tallyCells(signalSample)], 0) as [ColumnStyle, ColumnStyle]
  const decimalMark = timeStyle.decimal
  const maxPoints = options.maxPoints ?? MAX_TRACE_POINTS
  const time: number[] = []
  const signal: number[] = []
  const errors: RowError[] = []
  for (let i = start.index; i < lines.length && errors.length < MAX_ERRORS; i++) {
    const line = lines[i]!
    if (line.trim() === '') continue
    const cells = splitTexts(line, start.delimiter)
    if (loneText(cells)) {
      warnings.push(`Row ${i + 1} is not part of the trace and was skipped.`)
      continue
    }
    const tRaw = cells[timeIdx] ?? ''
    const yRaw = cells[signalIdx] ?? ''
    const point = readPoint(i + 1, tRaw, timeStyle, yRaw, signalStyle)
    if ('message' in point) {
      errors.push(point)
      continue
    }
    if (Math.abs(point.y) > MAX_PEAK_AREA) {
      errors.push({
        row: i + 1,
        code: 'out-of-range',
        message: `Row ${i + 1}: the signal ${excerpt(yRaw)} is beyond any detector's range; check the export.`,
      })
      continue
    }
    if (time.length > 0 && !(point.t > time[time.length - 1]!)) {
      errors.push({
        row: i + 1,
        code: 'non-monotonic-time',
        message: `Row ${i + 1}: the time ${excerpt(tRaw)} does not increase from the row before.`,
      })
      continue
    }
    if (time.length >= maxPoints) return refuse(i + 1, 'too-many-rows', `The trace has more than ${maxPoints} points.`)
    time.push(point.t)
    signal.push(point.y)
  }
  if (errors.length) return { time: [], signal: [], warnings, errors, meta: null }
  if (time.length < 10) return refuse(start.index + 1, 'too-few-points', 'A trace needs at least 10 points.')
  const declared: TimeUnit | null = header ? timeUnitOf(header.names[timeIdx]?.unit ?? null) : null
  const { unit, source } = timeStyle.clock
    ? { unit: 'min' as const, source: 'cells' as const }
    : chooseTimeUnit([time[time.length - 1]!], declared, options.timeUnit, options.expectedMaxMinutes, warnings)
  const factor = toMinutes(unit)
  if (factor !== 1) for (let i = 0; i < time.length; i++) time[i]! *= factor
  if (time[time.length - 1]! > MAX_RETENTION_MINUTES) {
    return refuse(
      start.index + 1,
      'out-of-range',
      `The trace runs to ${+time[time.length - 1]!.toPrecision(6)} min, more than ${MAX_RETENTION_MINUTES / 60} hours; check the time unit of the export.`,
    )
  }
  return {
    time, signal, warnings, errors: [],
    meta: {
      delimiter: start.delimiter, decimalComma: decimalMark === ',', decimalMark,
      headerRow: header?.row ?? null, firstDataRow: start.index + 1, timeUnit: unit, timeUnitSource: source,
    },
  }
}

export interface UploadSniff {
  kind: 'peak-table' | 'trace' | 'unknown'
  reason: string
}

/** Says whether a text upload is a peak table or a raw trace (many rows, increasing time, no area column). */
export function sniffUpload(text: string, split?: string[]): UploadSniff {
  if (typeof text !== 'string' || text.trim() === '') return { kind: 'unknown', reason: 'The file is empty.' }
  const lines = split ?? splitLines(text)
  const header = findHeader(lines)
  if (header?.kinds.has('rt') && (header.kinds.has('area') || header.kinds.has('areaPercent'))) {
    return { kind: 'peak-table', reason: `Row ${header.row} names retention-time and area columns.` }
  }
  const start = findDataStart(lines)
  if (start) {
    const head = lines.slice(0, Math.min(lines.length, start.index + 2000))
    // The probe's lines are the head itself, unless a second BOM would be taken off again.
    const trace = parseTrace(head.join('\n'), { maxBytes: Number.POSITIVE_INFINITY }, head[0]?.startsWith('\uFEFF') ? undefined : head)
    const rows = lines.length - start.index
    if (trace.errors.length === 0 && rows >= MIN_TRACE_POINTS) {
      return { kind: 'trace', reason: `About ${rows} rows of time and signal with increasing time and no area column.` }
    }
  }
  if (header) return { kind: 'peak-table', reason: `Row ${header.row} looks like a peak-table header.` }
  return { kind: 'unknown', reason: 'Neither a peak-table header nor a time/signal trace was recognised.' }
}
