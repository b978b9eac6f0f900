// Peak-table reader for integration reports exported as CSV, TSV, semicolon or aligned text.
import {
  type Cell, type ColumnKind, type DecimalMark, type Delimiter, type TimeUnit,
  SEPARATOR_LINE, alignCells, classifyHeader, decimalCommaColumns, isUnitCell, looksNumeric,
  mergeHeaderTokens, parseNumber, separatorHint, splitCells, splitLines, splitWideGaps, timeUnitOf, utf8Length,
} from './table-text'

export interface Peak {
  /** Minutes. */
  retentionTime: number
  area: number
  areaPercent?: number
  height?: number
  /** 1-based line of the file the peak came from (absent for detected peaks). */
  row?: number
}

export type ParseErrorCode =
  | 'too-large' | 'empty' | 'no-header' | 'no-rt-column' | 'no-area-column' | 'no-peaks'
  | 'non-numeric' | 'negative-value' | 'duplicate-rt' | 'too-many-rows' | 'misaligned' | 'non-monotonic-time' | 'too-few-points'

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
  headerRow: number
  timeUnit: TimeUnit
  timeUnitSource: 'header' | 'option' | 'detected' | 'assumed'
  columns: string[]
}

export interface ParsedPeakTable {
  peaks: Peak[]
  warnings: string[]
  errors: RowError[]
  meta: TableMeta | null
}

export const MAX_PEAK_ROWS = 5000
export const MAX_TABLE_BYTES = 2_000_000
const HEADER_SCAN_LINES = 200
const MAX_ERRORS = 100
/** Undeclared times above this are read as seconds: a teaching GC run does not last 90 min (common practice). */
export const SECONDS_THRESHOLD = 90

export interface HeaderCandidate {
  row: number
  delimiter: Delimiter
  cells: Cell[]
  kinds: Map<ColumnKind, { index: number, unit: string | null }>
}

function candidatesFor(line: string): HeaderCandidate[] {
  const out: Omit<HeaderCandidate, 'row'>[] = []
  const consider = (delimiter: Delimiter, cells: Cell[]) => {
    const kinds = new Map<ColumnKind, { index: number, unit: string | null }>()
    cells.forEach((c, index) => {
      const { kind, unit } = classifyHeader(c.text)
      if (kind && !kinds.has(kind)) kinds.set(kind, { index, unit })
    })
    out.push({ delimiter, cells, kinds })
  }
  for (const d of ['\t', ';', ','] as const) if (line.includes(d)) consider(d, splitCells(line, d))
  consider('whitespace', splitWideGaps(line))
  consider('whitespace', mergeHeaderTokens(splitCells(line, 'whitespace')))
  return out.map(c => ({ ...c, row: 0 }))
}

const tableScore = (c: HeaderCandidate) => ['rt', 'area', 'areaPercent', 'height'].filter(k => c.kinds.has(k as ColumnKind)).length

/** The header row: the first line naming both a time and an area, else the best partial one (for the error). */
export function findHeader(lines: string[], wanted: ColumnKind[] = ['rt', 'area']): HeaderCandidate | null {
  let partial: HeaderCandidate | null = null
  for (let i = 0; i < Math.min(lines.length, HEADER_SCAN_LINES); i++) {
    const line = lines[i]!
    if (line.trim() === '' || SEPARATOR_LINE.test(line)) continue
    const best = candidatesFor(line).sort((a, b) => tableScore(b) - tableScore(a))[0]!
    best.row = i + 1
    if (wanted.every(k => best.kinds.has(k))) return best
    if ((best.kinds.has('rt') || best.kinds.has('area')) && best.cells.length >= 2 && (!partial || tableScore(best) > tableScore(partial))) partial = best
  }
  return partial
}

const TOTALS = /^(grand\s+)?(totals?|sum|summe|gesamt)\b|^[σΣ∑]/i

function rowCells(line: string, header: HeaderCandidate): (string | undefined)[] | null {
  const cells = splitCells(line, header.delimiter)
  if (header.delimiter !== 'whitespace' || cells.length === header.cells.length) return cells.map(c => c.text)
  return alignCells(cells, header.cells)
}

/** A row of units under the header; its retention-time cell, when present, must name a time unit. */
function isUnitsRow(cells: (string | undefined)[], header: HeaderCandidate): boolean {
  const present = cells.filter((c): c is string => !!c && c.trim() !== '')
  if (present.length === 0 || !present.every(isUnitCell)) return false
  const rt = cells[header.kinds.get('rt')!.index]?.trim().replace(/^[[(]|[\])]$/g, '') ?? ''
  return rt === '' || timeUnitOf(rt) !== null
}

interface RawRow { row: number, cells: (string | undefined)[] }

function isRepeatedHeader(cells: (string | undefined)[], header: HeaderCandidate): boolean {
  const rt = header.kinds.get('rt')!.index
  const area = header.kinds.get('area')?.index
  return classifyHeader(cells[rt] ?? '').kind === 'rt' && area !== undefined && classifyHeader(cells[area] ?? '').kind === 'area'
}

function collectRows(lines: string[], header: HeaderCandidate, warnings: string[], errors: RowError[]): { rows: RawRow[], unitsRow: (string | undefined)[] | null } {
  const rows: RawRow[] = []
  const textLines: RawRow[] = []
  let unitsRow: (string | undefined)[] | null = null
  for (let i = header.row; i < lines.length; i++) {
    const line = lines[i]!
    if (line.trim() === '' || SEPARATOR_LINE.test(line)) continue
    const cells = rowCells(line, header)
    if (!cells) {
      errors.push({ row: i + 1, code: 'misaligned', message: `Row ${i + 1}: the values do not line up with the header columns.` })
      continue
    }
    if (rows.length === 0 && !unitsRow && isUnitsRow(cells, header)) { unitsRow = cells; continue }
    if (isRepeatedHeader(cells, header)) {
      // Reports with several detector signals repeat the table; the first one is the product run.
      if (rows.length > 0) { warnings.push(`A second table starts at row ${i + 1}; only the first table was read.`); break }
      continue
    }
    const filled = cells.filter((c): c is string => c !== undefined && c.trim() !== '')
    if (filled.some(c => TOTALS.test(c.trim()))) {
      warnings.push(`Row ${i + 1} looks like a totals row and was skipped.`)
      continue
    }
    if (filled.length === 1 && !looksNumeric(filled[0]!)) {
      warnings.push(`Row ${i + 1} is not part of the table ("${filled[0]!.slice(0, 40)}") and was skipped.`)
      continue
    }
    // A text-only line after the peaks ("Printed by,lab3") is a footer, unless more peaks follow it.
    if (rows.length > 0 && filled.every(c => !looksNumeric(c))) {
      textLines.push({ row: i + 1, cells })
      continue
    }
    if (textLines.length) { rows.push(...textLines); textLines.length = 0 }
    if (header.delimiter === ',' && filled.length > header.cells.length) {
      errors.push({ row: i + 1, code: 'misaligned', message: `Row ${i + 1} has more values than the header has columns: a name or number containing a comma must be quoted (or export with semicolons or tabs if the file uses decimal commas).` })
      continue
    }
    rows.push({ row: i + 1, cells })
  }
  for (const t of textLines) warnings.push(`Row ${t.row} follows the table and holds no numbers ("${t.cells.filter(Boolean).join(' ').slice(0, 40)}"); it was skipped.`)
  return { rows, unitsRow }
}

/** Two "Area" columns whose units row says "%" for one of them: that one is the area %. */
function percentFromUnits(header: HeaderCandidate, unitsRow: (string | undefined)[] | null): HeaderCandidate['kinds'] {
  const kinds = new Map(header.kinds)
  if (!unitsRow) return kinds
  const unitAt = (i: number) => unitsRow[i]?.trim().replace(/^[[(]|[\])]$/g, '') ?? ''
  const percent = header.cells.map((c, i) => i)
    .filter(i => unitAt(i) === '%' && classifyHeader(`${header.cells[i]!.text} %`).kind === 'areaPercent')
  if (percent.length === 0) return kinds
  const area = kinds.get('area')
  if (area && unitAt(area.index) === '%') {
    const absolute = header.cells.findIndex((c, i) => unitAt(i) !== '%' && classifyHeader(c.text).kind === 'area')
    if (absolute < 0) return kinds
    kinds.set('area', { index: absolute, unit: unitAt(absolute) || null })
  }
  if (!kinds.has('areaPercent')) kinds.set('areaPercent', { index: percent[0]!, unit: '%' })
  return kinds
}

function declaredTimeUnit(header: HeaderCandidate, unitsRow: (string | undefined)[] | null): TimeUnit | null {
  const rt = header.kinds.get('rt')!
  const fromHeader = timeUnitOf(rt.unit)
  if (fromHeader) return fromHeader
  const unitCell = unitsRow?.[rt.index]?.trim().replace(/^[[(]|[\])]$/g, '')
  return timeUnitOf(unitCell ?? null)
}

export function chooseTimeUnit(
  values: number[], declared: TimeUnit | null, option: PeakTableOptions['timeUnit'], expectedMaxMinutes: number | undefined, warnings: string[],
): { unit: TimeUnit, source: TableMeta['timeUnitSource'] } {
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

function optionalNumber(raw: string | undefined, decimalComma: DecimalMark): number | undefined | 'bad' {
  if (raw === undefined) return undefined
  const v = parseNumber(raw, decimalComma)
  if (v === null) return undefined
  return Number.isNaN(v) ? 'bad' : v
}

/** Reads a peak table. Any error refuses the whole table: `peaks` is then empty. */
export function parsePeakTable(text: string, options: PeakTableOptions = {}): ParsedPeakTable {
  const warnings: string[] = []
  const errors: RowError[] = []
  const refuse = (row: number, code: ParseErrorCode, message: string): ParsedPeakTable => ({ peaks: [], warnings, errors: [...errors, { row, code, message }], meta: null })
  const maxBytes = options.maxBytes ?? MAX_TABLE_BYTES
  if (typeof text !== 'string' || text.trim() === '') return refuse(0, 'empty', 'The file is empty.')
  if (text.length > maxBytes || utf8Length(text) > maxBytes) return refuse(0, 'too-large', `The file is larger than ${(maxBytes / 1e6).toFixed(0)} MB; a peak table is much smaller, so check that the right file was chosen.`)
  const lines = splitLines(text)
  const header = findHeader(lines)
  if (!header) return refuse(0, 'no-header', 'No header row naming the retention time and area columns was found.')
  if (!header.kinds.has('rt')) return refuse(header.row, 'no-rt-column', `Row ${header.row}: the header has no retention-time column (for example "RT" or "Retention time").`)
  if (!header.kinds.has('area')) {
    const hint = header.kinds.has('signal') ? ' It looks like a raw detector trace: upload it as a trace instead.' : ''
    return refuse(header.row, 'no-area-column', `Row ${header.row}: the header has no area column; export the table with peak areas ("Area"), not only heights or area %.${hint}`)
  }
  const { rows, unitsRow } = collectRows(lines, header, warnings, errors)
  const maxRows = options.maxRows ?? MAX_PEAK_ROWS
  if (rows.length > maxRows) return refuse(rows[maxRows]!.row, 'too-many-rows', `The table has more than ${maxRows} data rows; a peak table should list one row per peak.`)
  const kinds = percentFromUnits(header, unitsRow)
  const rtIdx = kinds.get('rt')!.index
  const areaIdx = kinds.get('area')!.index
  const pctIdx = kinds.get('areaPercent')?.index
  const hIdx = kinds.get('height')?.index
  // In comma-delimited files a decimal comma can only appear inside quotes, which splitCells has removed.
  const numberColumns = [rtIdx, areaIdx, pctIdx, hIdx]
  const commas = decimalCommaColumns(numberColumns.map(idx => idx === undefined ? [] : rows.map(r => r.cells[idx] ?? '')), header.delimiter)
  const [rtComma, areaComma, pctComma, hComma] = commas as [DecimalMark, DecimalMark, DecimalMark, DecimalMark]
  const decimalComma = rtComma === true
  const parsed: Peak[] = []
  const seen = new Map<number, number>()
  const areaSum = { value: 0 }
  const badOptional = new Set<string>()
  for (const { row, cells } of rows) {
    if (errors.length >= MAX_ERRORS) break
    const rt = parseNumber(cells[rtIdx] ?? '', rtComma)
    const area = parseNumber(cells[areaIdx] ?? '', areaComma)
    if (rt === null && area !== null && !Number.isNaN(area) && parsed.length > 1 && Math.abs(area - areaSum.value) <= 0.005 * areaSum.value) {
      warnings.push(`Row ${row} has no retention time and its area equals the sum of the peaks: it was skipped as a totals row.`)
      continue
    }
    const problems: RowError[] = []
    if (rt === null) problems.push({ row, code: 'non-numeric', message: `Row ${row}: the retention time is missing.` })
    else if (Number.isNaN(rt)) problems.push({ row, code: 'non-numeric', message: `Row ${row}: the retention time "${cells[rtIdx]}" is not a number${separatorHint(cells[rtIdx] ?? '', rtComma)}.` })
    else if (rt < 0) problems.push({ row, code: 'negative-value', message: `Row ${row}: the retention time ${cells[rtIdx]} is negative.` })
    if (area === null) problems.push({ row, code: 'non-numeric', message: `Row ${row}: the area is missing.` })
    else if (Number.isNaN(area)) problems.push({ row, code: 'non-numeric', message: `Row ${row}: the area "${cells[areaIdx]}" is not a number${separatorHint(cells[areaIdx] ?? '', areaComma)}.` })
    else if (area < 0) problems.push({ row, code: 'negative-value', message: `Row ${row}: the area ${cells[areaIdx]} is negative; re-integrate the peak or check the baseline.` })
    if (problems.length === 0 && rt !== null && seen.has(rt)) {
      problems.push({ row, code: 'duplicate-rt', message: `Row ${row}: retention time ${cells[rtIdx]} already appears on row ${seen.get(rt)}; remove the duplicate row.` })
    }
    if (problems.length) { errors.push(...problems); continue }
    seen.set(rt!, row)
    areaSum.value += area!
    const peak: Peak = { retentionTime: rt!, area: area!, row }
    for (const [key, idx, comma] of [['areaPercent', pctIdx, pctComma], ['height', hIdx, hComma]] as const) {
      if (idx === undefined) continue
      const v = optionalNumber(cells[idx], comma)
      if (v === 'bad') badOptional.add(key === 'height' ? 'height' : 'area %')
      else if (v !== undefined) peak[key] = v
    }
    parsed.push(peak)
  }
  for (const name of badOptional) warnings.push(`Some ${name} values are not numbers and were left out.`)
  if (errors.length) return { peaks: [], warnings, errors, meta: null }
  if (parsed.length === 0) return refuse(header.row, 'no-peaks', `The table under the header on row ${header.row} has no peak rows.`)
  const { unit, source } = chooseTimeUnit(parsed.map(p => p.retentionTime), declaredTimeUnit(header, unitsRow), options.timeUnit, options.expectedMaxMinutes, warnings)
  const factor = toMinutes(unit)
  if (factor !== 1) for (const p of parsed) p.retentionTime *= factor
  return {
    peaks: parsed,
    warnings,
    errors: [],
    meta: { delimiter: header.delimiter, decimalComma, headerRow: header.row, timeUnit: unit, timeUnitSource: source, columns: header.cells.map(c => c.text) },
  }
}
