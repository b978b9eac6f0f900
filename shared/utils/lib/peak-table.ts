// Peak-table reader for integration reports exported as CSV, TSV, semicolon or aligned text.
import type { TimeUnit } from './header-names'
import {
  type Mark, type ColumnStyle, type ReadProblem,
  decideStyles, excerpt, ungroupedWitness,
} from './number-text'
import { type ColumnReads, type ScannedColumn, fastPaths, readScanned, readingAt, scanColumn } from './plain-number'
import { type ColumnMap, type HeaderCandidate, type RawRow, collectRows, columnsOf, declaredTimeUnit, findHeader } from './table-layout'
import { readPlainTable } from './plain-table'
import { type Delimiter, mayExceed, splitLines } from './table-text'
import { MAX_UPLOAD_BYTES } from '../limits'

export type { HeaderCandidate } from './table-layout'
export { findHeader } from './table-layout'

export interface Peak {
  /** Minutes. */
  retentionTime: number
  area: number
  areaPercent?: number
  height?: number
  /** 1-based line of the file the peak came from (absent for detected peaks). */
  row?: number
}

/**
 * A copy of a peak with one more field. Written out field by field: spreading thousands of
 * peaks of a few shapes (with or without area % and height) was a tenth of a long table's time.
 */
export function peakWith<K extends string, V>(p: Peak, key: K, value: V): Peak & Record<K, V> {
  const out = { retentionTime: p.retentionTime, area: p.area } as Peak & Record<K, V>
  if (p.areaPercent !== undefined) out.areaPercent = p.areaPercent
  if (p.height !== undefined) out.height = p.height
  if (p.row !== undefined) out.row = p.row
  ;(out as Record<K, V>)[key] = value
  return out
}

export type ParseErrorCode =
  | 'too-large' | 'empty' | 'no-header' | 'no-rt-column' | 'no-area-column' | 'no-peaks'
  | 'non-numeric' | 'negative-value' | 'duplicate-rt' | 'too-many-rows' | 'misaligned' | 'non-monotonic-time' | 'too-few-points'
  | 'ambiguous-number' | 'out-of-range'

export interface RowError {
  /** 1-based line number in the file; 0 when the problem is the file as a whole. */
  row: number
  message: string
  code: ParseErrorCode
}

export interface PeakTableOptions {
  /** Overrides what the header declares or the heuristic detects. */
  timeUnit?: 'auto' | TimeUnit
  /** Latest retention time (min) the method expects, e.g. the last window's end; sharpens seconds detection. */
  expectedMaxMinutes?: number
  maxRows?: number
  maxBytes?: number
}

export interface TableMeta {
  delimiter: Delimiter
  decimalComma: boolean
  /** The decimal mark of the retention-time column; null when no cell shows one. */
  decimalMark: Mark | null
  headerRow: number
  timeUnit: TimeUnit
  /** 'cells' when the times were written m:ss. */
  timeUnitSource: 'header' | 'option' | 'detected' | 'assumed' | 'cells'
  columns: string[]
  /** 'areaPercent' when the file has no absolute areas and the area % column stood in for them. */
  areaSource: 'area' | 'areaPercent'
}

export interface ParsedPeakTable {
  peaks: Peak[]
  warnings: string[]
  errors: RowError[]
  meta: TableMeta | null
}

export const MAX_PEAK_ROWS = 5000
const MAX_ERRORS = 100
/** Undeclared times above this are read as seconds: a teaching GC run does not last 90 min (common practice). */
export const SECONDS_THRESHOLD = 90
/**
 * Largest area taken as a measurement. A 24-bit converter read 100 times a second for a whole
 * hour sums to about 6e12 counts, so no integrator reports 1e15 (common practice); anything
 * larger is a broken export, and refusing it keeps every later sum and ratio finite.
 */
export const MAX_PEAK_AREA = 1e15
/** Latest retention time taken as real: GC programs run minutes to a couple of hours, never ten (common practice). */
export const MAX_RETENTION_MINUTES = 600

export function chooseTimeUnit(
  values: number[],
  declared: TimeUnit | null,
  option: PeakTableOptions['timeUnit'],
  expectedMaxMinutes: number | undefined,
  warnings: string[],
): { unit: TimeUnit, source: 'header' | 'option' | 'detected' | 'assumed' } {
  if (option && option !== 'auto') return { unit: option, source: 'option' }
  if (declared) return { unit: declared, source: 'header' }
  const max = values.reduce((m, v) => Math.max(m, v), 0)
  // With the method's last expected time E: seconds when the times overshoot 10E as minutes (a
  // late polychlorinated peak or a bake-out stays well below that) but fit within 3E as seconds.
  // Without it: seconds above SECONDS_THRESHOLD.
  const seconds = expectedMaxMinutes && expectedMaxMinutes > 0
    ? max > 10 * expectedMaxMinutes && max / 60 <= 3 * expectedMaxMinutes
    : max > SECONDS_THRESHOLD
  if (seconds) {
    warnings.push(`Times have no unit and reach ${max}; they were read as seconds and converted to minutes.`)
    return { unit: 's', source: 'detected' }
  }
  return { unit: 'min', source: 'assumed' }
}

export const toMinutes = (unit: TimeUnit) => (unit === 's' ? 1 / 60 : unit === 'ms' ? 1 / 60000 : 1)

const MARK_NAME: Record<Mark, string> = { ',': 'comma', '.': 'point' }

/** Why a cell was refused, as the end of "Row N: the area …". */
export function describeProblem(what: string, raw: string, p: ReadProblem): string {
  const cell = excerpt(raw)
  switch (p.kind) {
    case 'ambiguous':
      return `the ${what} ${cell} could be ${p.readings[0]} or ${p.readings[1]}: nothing in the file shows whether the ${MARK_NAME[p.mark]} is a decimal mark or a thousands separator. Export the table with its decimals shown, or without thousands separators`
    case 'too-large':
      return `the ${what} "${cell}" is not a number (it is too large to be a number)`
    case 'mixed':
      if (p.decimal === null) {
        return `the ${what} "${cell}" is not a number (the column mixes decimal commas and points, so it cannot be read safely: export it with one decimal mark)`
      }
      return `the ${what} "${cell}" is not a number (this column uses decimal ${MARK_NAME[p.decimal]}s elsewhere, so a ${MARK_NAME[p.decimal === ',' ? '.' : ',']} here is ambiguous)`
    case 'clock-mix':
      return `the ${what} "${cell}" is not a number (the column writes times as minutes:seconds elsewhere)`
    default:
      return `the ${what} "${cell}" is not a number`
  }
}

interface Column {
  key: 'rt' | 'area' | 'areaPercent' | 'height'
  what: string
  index: number
  style: ColumnStyle
  /** Plain cells' numbers (NaN elsewhere) and the other cells' readings. */
  reads: ColumnReads
  /** Cells whose reading as grouped thousands is refused: a retention time, or a column that writes long numbers ungrouped. */
  regrouped: Map<number, string>
}

/** The index of the cell that shows the column ungrouped (ungroupedWitness), reading every cell only when one is grouped. */
function witnessOf(column: ScannedColumn, reads: ColumnReads): number {
  // Plain cells are never grouped: without a grouped reading among the others there is no witness to find.
  const anyGrouped = reads.others.some((r) => r && !('problem' in r) && r.grouped)
  if (!anyGrouped) return -1
  return ungroupedWitness(column.cells.map((_, i) => readingAt(column, reads, i)))
}

/**
 * Reads every cell of the number columns in the column's style. A "45,769" read as 45769 in a
 * column that also writes "98765" unseparated is refused: the column does not group thousands,
 * so the comma may be a decimal after all. A retention time is never read as grouped.
 */
function readColumns(rows: RawRow[], specs: Omit<Column, 'style' | 'reads' | 'regrouped'>[]): Column[] {
  // One pass over the rows for all the columns.
  const cells: string[][] = specs.map(() => [])
  for (const r of rows) for (let k = 0; k < specs.length; k++) cells[k]!.push(r.cells[specs[k]!.index] ?? '')
  const scanned = cells.map(scanColumn)
  const styles = decideStyles(scanned.map((c) => c.tally), 0)
  return specs.map((spec, k) => {
    const reads = readScanned(scanned[k]!, styles[k]!)
    const regrouped = new Map<number, string>()
    const witness = witnessOf(scanned[k]!, reads)
    reads.others.forEach((r, i) => {
      if (!r || 'problem' in r || !r.grouped || !r.ambiguous) return
      const readings = `the ${spec.what} ${excerpt(cells[k]![i]!)} could be ${r.value} or ${String(r.value / 1000)}`
      // Retention times are never grouped by thousands, so a grouped reading is the file's marks disagreeing.
      if (spec.key === 'rt') {
        regrouped.set(
          i,
          `${readings}: retention times are not written with thousands separators, so this mark disagrees with the file's decimal mark`,
        )
      } else if (witness >= 0) {
        const elsewhere = `row ${rows[witness]!.row} reads ${excerpt(cells[k]![witness]!)}`
        regrouped.set(i, `${readings}: the column does not group thousands elsewhere (${elsewhere}), so the mark may be a decimal`)
      }
    })
    return { ...spec, style: styles[k]!, reads, regrouped }
  })
}

/** A cell's number, the row's error, or null when the cell is empty. */
function valueAt(col: Column, i: number, row: number, raw: string): number | RowError | null {
  const plain = col.reads.plain[i]!
  if (plain === plain) return plain
  const r = col.reads.others[i]
  if (r === null || r === undefined) return null
  const regrouped = col.regrouped.get(i)
  if (regrouped) return { row, code: 'ambiguous-number', message: `Row ${row}: ${regrouped}.` }
  if ('problem' in r) {
    return {
      row,
      code: r.problem.kind === 'ambiguous' ? 'ambiguous-number' : 'non-numeric',
      message: `Row ${row}: ${describeProblem(col.what, raw, r.problem)}.`,
    }
  }
  return r.value
}

type ColumnSpec = Omit<Column, 'style' | 'reads' | 'regrouped'>

/** The columns to read: retention time, area (or area % when there is no area), then area % and height if present. */
function columnSpecs(kinds: ColumnMap, fromPercent: boolean): ColumnSpec[] {
  const specs: ColumnSpec[] = [
    { key: 'rt', what: 'retention time', index: kinds.get('rt')!.index },
    { key: 'area', what: fromPercent ? 'area %' : 'area', index: kinds.get(fromPercent ? 'areaPercent' : 'area')!.index },
  ]
  if (!fromPercent && kinds.has('areaPercent')) specs.push({ key: 'areaPercent', what: 'area %', index: kinds.get('areaPercent')!.index })
  if (kinds.has('height')) specs.push({ key: 'height', what: 'height', index: kinds.get('height')!.index })
  return specs
}

/** What is wrong with one row's retention time and area (missing, unreadable, negative, out of range, repeated). */
function peakRowProblems(
  row: number, rt: number | RowError | null, area: number | RowError | null, raw: { rt: string, area: string },
  areaCol: Column, fromPercent: boolean, seen: SeenTimes,
): RowError[] {
  const problems: RowError[] = []
  if (rt === null) problems.push({ row, code: 'non-numeric', message: `Row ${row}: the retention time is missing.` })
  else if (typeof rt !== 'number') problems.push(rt)
  else if (rt < 0) problems.push({ row, code: 'negative-value', message: `Row ${row}: the retention time ${excerpt(raw.rt)} is negative.` })
  if (area === null) problems.push({ row, code: 'non-numeric', message: `Row ${row}: the ${areaCol.what} is missing.` })
  else if (typeof area !== 'number') problems.push(area)
  else if (area < 0) {
    problems.push({
      row, code: 'negative-value',
      message: `Row ${row}: the ${areaCol.what} ${excerpt(raw.area)} is negative; re-integrate the peak or check the baseline.`,
    })
  } else if (area > (fromPercent ? 100 : MAX_PEAK_AREA)) {
    problems.push({ row, code: 'out-of-range', message: fromPercent
      ? `Row ${row}: the area % ${excerpt(raw.area)} is above 100.`
      : `Row ${row}: the area ${excerpt(raw.area)} is above 1e15, far beyond what an integrator reports; check the export.` })
  }
  if (problems.length === 0 && typeof rt === 'number' && seen.has(rt)) {
    problems.push({
      row, code: 'duplicate-rt',
      message: `Row ${row}: retention time ${excerpt(raw.rt)} already appears on row ${seen.get(rt)}; remove the duplicate row.`,
    })
  }
  return problems
}

/**
 * The retention times read so far, with their rows. While the times keep increasing (as in
 * nearly every export) a new time cannot be a repeat and nothing is hashed; the first time that
 * does not increase turns the list into a Map.
 */
class SeenTimes {
  private times: number[] = []
  private rows: number[] = []
  private map: Map<number, number> | null = null
  private max = Number.NEGATIVE_INFINITY

  has(rt: number): boolean {
    if (!this.map && rt > this.max) return false
    return this.asMap().has(rt)
  }

  get(rt: number): number | undefined {
    return this.asMap().get(rt)
  }

  set(rt: number, row: number): void {
    if (!this.map && rt > this.max) {
      this.max = rt
      this.times.push(rt)
      this.rows.push(row)
    } else {
      this.asMap().set(rt, row)
    }
  }

  private asMap(): Map<number, number> {
    if (!this.map) {
      this.map = new Map()
      for (let k = 0; k < this.times.length; k++) this.map.set(this.times[k]!, this.rows[k]!)
    }
    return this.map
  }
}

/** Area % and height where the row has them in range; the names of columns with values left out go to `leftOut`. */
function addOptionalValues(peak: Peak, extras: Column[], i: number, row: number, cells: RawRow['cells'], leftOut: Set<string>) {
  for (const col of extras) {
    const v = valueAt(col, i, row, cells[col.index] ?? '')
    const limit = col.key === 'areaPercent' ? 100 : MAX_PEAK_AREA
    if (typeof v === 'number' && Math.abs(v) <= limit) peak[col.key as 'areaPercent' | 'height'] = v
    else if (v !== null) leftOut.add(col.what)
  }
}

/** Reads the data rows into peaks, collecting each row's errors; a totals row is skipped with a warning. */
function readPeakRows(rows: RawRow[], columns: Column[], fromPercent: boolean, warnings: string[], errors: RowError[]): Peak[] {
  const [rtCol, areaCol] = columns as [Column, Column]
  const parsed: Peak[] = []
  const seen = new SeenTimes()
  let areaSum = 0
  const leftOut = new Set<string>()
  const extras = columns.slice(2)
  const areaLimit = fromPercent ? 100 : MAX_PEAK_AREA
  rows.forEach(({ row, cells }, i) => {
    if (errors.length >= MAX_ERRORS) return
    const rt = valueAt(rtCol, i, row, cells[rtCol.index] ?? '')
    const area = valueAt(areaCol, i, row, cells[areaCol.index] ?? '')
    if (rt === null && typeof area === 'number' && parsed.length > 1 && Math.abs(area - areaSum) <= 0.005 * areaSum) {
      warnings.push(`Row ${row} has no retention time and its area equals the sum of the peaks: it was skipped as a totals row.`)
      return
    }
    // The usual row (two numbers in range, a time not seen before) needs no list of its problems.
    const clean = typeof rt === 'number' && typeof area === 'number' && rt >= 0 && area >= 0 && area <= areaLimit && !seen.has(rt)
    if (!clean) {
      const raw = { rt: cells[rtCol.index] ?? '', area: cells[areaCol.index] ?? '' }
      const problems = peakRowProblems(row, rt, area, raw, areaCol, fromPercent, seen)
      if (problems.length || typeof rt !== 'number' || typeof area !== 'number') { errors.push(...problems); return }
    }
    const retentionTime = rt as number
    seen.set(retentionTime, row)
    areaSum += area as number
    const peak: Peak = { retentionTime, area: area as number, row }
    if (fromPercent) peak.areaPercent = area as number
    if (extras.length) addOptionalValues(peak, extras, i, row, cells, leftOut)
    parsed.push(peak)
  })
  for (const name of leftOut) warnings.push(leftOutWarning(name))
  return parsed
}

const leftOutWarning = (name: string) => `Some ${name} values are not numbers or out of range and were left out.`

/** Retention times in minutes (clock cells are minutes already), with the unit and where it came from; over-long times are errors. */
function retentionInMinutes(
  parsed: Peak[], clock: boolean, declared: ReturnType<typeof declaredTimeUnit>, options: PeakTableOptions,
  warnings: string[], errors: RowError[],
) {
  const { unit, source } = clock
    ? { unit: 'min' as const, source: 'cells' as const }
    : chooseTimeUnit(parsed.map((p) => p.retentionTime), declared, options.timeUnit, options.expectedMaxMinutes, warnings)
  const factor = toMinutes(unit)
  if (factor !== 1) for (const p of parsed) p.retentionTime *= factor
  for (const p of parsed) {
    if (p.retentionTime > MAX_RETENTION_MINUTES && errors.length < MAX_ERRORS) {
      errors.push({
        row: p.row!, code: 'out-of-range',
        message: `Row ${p.row}: the retention time ${+p.retentionTime.toPrecision(6)} min is more than ${MAX_RETENTION_MINUTES / 60} hours; check the time unit of the export.`,
      })
    }
  }
  return { unit, source }
}

type Refusal = [row: number, code: ParseErrorCode, message: string]
interface TableRead { parsed: Peak[], styles: ColumnStyle[], unitsRow: (string | undefined)[] | null, fromPercent: boolean }

const noAreaColumn = (header: HeaderCandidate): Refusal => {
  const hint = header.kinds.has('signal') ? ' It looks like a raw detector trace: upload it as a trace instead.' : ''
  return [
    header.row,
    'no-area-column',
    `Row ${header.row}: the header has no area column; export the table with peak areas ("Area") or area %, not only heights.${hint}`,
  ]
}

const tooManyRows = (row: number, maxRows: number): Refusal =>
  [row, 'too-many-rows', `The table has more than ${maxRows} data rows; a peak table should list one row per peak.`]

const FROM_PERCENT = 'The file has no absolute peak areas, so the mole % were computed from its area % column.'

/** The general path: rows collected with every layout rule, each cell read in its column's style. */
function readTable(
  lines: string[], header: HeaderCandidate, options: PeakTableOptions, warnings: string[], errors: RowError[],
): TableRead | { refused: Refusal } {
  const { rows, unitsRow, errors: layout } = collectRows(lines, header, warnings)
  errors.push(...layout)
  const kinds = columnsOf(header, unitsRow)
  if (!kinds.has('area') && !kinds.has('areaPercent')) return { refused: noAreaColumn(header) }
  const maxRows = options.maxRows ?? MAX_PEAK_ROWS
  if (rows.length > maxRows) return { refused: tooManyRows(rows[maxRows]!.row, maxRows) }
  const fromPercent = !kinds.has('area')
  if (fromPercent) warnings.push(FROM_PERCENT)
  const columns = readColumns(rows, columnSpecs(kinds, fromPercent))
  const parsed = readPeakRows(rows, columns, fromPercent, warnings, errors)
  return { parsed, styles: columns.map((c) => c.style), unitsRow, fromPercent }
}

/**
 * The fast pass (plain-table.ts) for a table of plain rows: the same peaks, styles and warnings
 * readTable gives it, or null when readTable must read it.
 */
function plainPeakTable(text: string, header: HeaderCandidate, options: PeakTableOptions, warnings: string[]): TableRead | null {
  const kinds: ColumnMap = header.kinds
  if (!kinds.has('area') && !kinds.has('areaPercent')) return null
  const fromPercent = !kinds.has('area')
  const read = readPlainTable(text, header.delimiter, columnSpecs(kinds, fromPercent), {
    maxRows: options.maxRows ?? MAX_PEAK_ROWS,
    areaLimit: fromPercent ? 100 : MAX_PEAK_AREA,
    heightLimit: MAX_PEAK_AREA,
    fromPercent,
    headerRow: header.row,
    headerCells: header.cells.length,
    headerFirst: header.cells[0]?.text ?? '',
  })
  if (!read) return null
  if (fromPercent) warnings.push(FROM_PERCENT)
  for (const name of read.leftOut) warnings.push(leftOutWarning(name))
  return { parsed: read.peaks, styles: read.styles, unitsRow: null, fromPercent }
}

/** Reads a peak table. Any error refuses the whole table: `peaks` is then empty. */
export function parsePeakTable(text: string, options: PeakTableOptions = {}, split?: string[]): ParsedPeakTable {
  const warnings: string[] = []
  const errors: RowError[] = []
  const refuse = (row: number, code: ParseErrorCode, message: string): ParsedPeakTable => (
    { peaks: [], warnings, errors: [...errors, { row, code, message }], meta: null }
  )
  const maxBytes = options.maxBytes ?? MAX_UPLOAD_BYTES
  if (typeof text !== 'string' || text.trim() === '') return refuse(0, 'empty', 'The file is empty.')
  if (mayExceed(text, maxBytes)) {
    return refuse(
      0,
      'too-large',
      `The file is larger than ${(maxBytes / 1e6).toFixed(0)} MB; a peak table is much smaller, so check that the right file was chosen.`,
    )
  }
  const lines = split ?? splitLines(text)
  const header = findHeader(lines)
  if (!header) return refuse(0, 'no-header', 'No header row naming the retention time and area columns was found.')
  if (!header.kinds.has('rt')) {
    return refuse(
      header.row,
      'no-rt-column',
      `Row ${header.row}: the header has no retention-time column (for example "RT" or "Retention time").`,
    )
  }
  const plain = fastPaths.enabled ? plainPeakTable(text, header, options, warnings) : null
  const read = plain ?? readTable(lines, header, options, warnings, errors)
  if ('refused' in read) return refuse(...read.refused)
  const { parsed, styles, unitsRow, fromPercent } = read
  if (errors.length) return { peaks: [], warnings, errors, meta: null }
  if (parsed.length === 0) return refuse(header.row, 'no-peaks', `The table under the header on row ${header.row} has no peak rows.`)
  const { unit, source } = retentionInMinutes(parsed, styles[0]!.clock, declaredTimeUnit(header, unitsRow), options, warnings, errors)
  if (errors.length) return { peaks: [], warnings, errors, meta: null }
  const decimalMark = styles[0]!.decimal ?? styles.find((c) => c.decimal)?.decimal ?? null
  return {
    peaks: parsed,
    warnings,
    errors: [],
    meta: {
      delimiter: header.delimiter, decimalComma: decimalMark === ',', decimalMark, headerRow: header.row,
      timeUnit: unit, timeUnitSource: source,
      columns: header.cells.map((c) => c.text), areaSource: fromPercent ? 'areaPercent' : 'area',
    },
  }
}
