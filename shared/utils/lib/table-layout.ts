// Where a peak table sits in an export: its header row, units row, data rows, and what to skip
// around them (totals, report furniture, page breaks that reprint the header).
import { type ColumnKind, type TimeUnit, classifyHeader, timeUnitOf } from './header-names'
import { excerpt, looksNumeric } from './number-text'
import { NOT_PLAIN, fastPaths, plainKind } from './plain-number'
import {
  type Cell, type Delimiter,
  SEPARATOR_LINE, alignCells, furnitureOf, isUnitCell, mergeHeaderTokens, splitCells, splitTexts, splitWideGaps,
} from './table-text'

export interface HeaderCandidate {
  row: number
  delimiter: Delimiter
  cells: Cell[]
  kinds: Map<ColumnKind, { index: number, unit: string | null }>
}

export interface LayoutError { row: number, code: 'misaligned', message: string }

const HEADER_SCAN_LINES = 200

function candidatesFor(line: string): HeaderCandidate[] {
  const out: HeaderCandidate[] = []
  const consider = (delimiter: Delimiter, cells: Cell[]) => {
    const kinds = new Map<ColumnKind, { index: number, unit: string | null }>()
    // A header holds names only: "Area reject: 100   Time: 10:42" in a report's preamble is settings.
    if (cells.some((c) => looksNumeric(c.text) || /[:=]$/.test(c.text))) return
    cells.forEach((c, index) => {
      const { kind, unit } = classifyHeader(c.text)
      if (kind && !kinds.has(kind)) kinds.set(kind, { index, unit })
    })
    out.push({ delimiter, cells, kinds, row: 0 })
  }
  // A pipe rules the columns of some printed reports ("Peak | RT | Area").
  for (const d of ['\t', ';', ',', '|'] as const) if (line.includes(d)) consider(d, splitCells(line, d))
  consider('whitespace', splitWideGaps(line))
  consider('whitespace', mergeHeaderTokens(splitCells(line, 'whitespace')))
  if (out.length === 0) out.push({ delimiter: 'whitespace', cells: [], kinds: new Map(), row: 0 })
  return out
}

const tableScore = (c: HeaderCandidate) => ['rt', 'area', 'areaPercent', 'height'].filter((k) => c.kinds.has(k as ColumnKind)).length
/** A table needs a retention time and an area, absolute or as area %. */
const complete = (c: HeaderCandidate, wanted: ColumnKind[]) =>
  wanted.every((k) => k === 'area' ? c.kinds.has('area') || c.kinds.has('areaPercent') : c.kinds.has(k))

/** The header row: the first line naming a time and an area, else the best partial one (for the error). */
export function findHeader(lines: string[], wanted: ColumnKind[] = ['rt', 'area']): HeaderCandidate | null {
  let partial: HeaderCandidate | null = null
  for (let i = 0; i < Math.min(lines.length, HEADER_SCAN_LINES); i++) {
    const line = lines[i]!
    if (line.trim() === '' || SEPARATOR_LINE.test(line) || !/\p{L}|%/u.test(line)) continue
    const best = candidatesFor(line).sort((a, b) => tableScore(b) - tableScore(a))[0]!
    best.row = i + 1
    if (complete(best, wanted)) return best
    const usable = (best.kinds.has('rt') || best.kinds.has('area')) && best.cells.length >= 2
    if (usable && (!partial || tableScore(best) > tableScore(partial))) partial = best
  }
  return partial
}

const LETTER = /\p{L}/u
const TOTALS = /^(grand\s+)?(totals?|totale|totaal|totaux|sum|suma|summe|somme|soma|gesamt|insgesamt|razem)\b|^[σΣ∑]/i

function rowCells(line: string, header: HeaderCandidate): (string | undefined)[] | null {
  if (header.delimiter !== 'whitespace') return splitTexts(line, header.delimiter)
  const cells = splitCells(line, header.delimiter)
  return cells.length === header.cells.length ? cells.map((c) => c.text) : alignCells(cells, header.cells)
}

const CLOCK_UNIT = /^(h+:)?m+:s+$/i
const bare = (cell: string | undefined) => cell?.trim().replace(/^[[(]|[\])]$/g, '') ?? ''

/** A row of units under the header; its retention-time cell, when present, must name a time unit. */
function isUnitsRow(cells: (string | undefined)[], header: HeaderCandidate): boolean {
  const present = cells.filter((c): c is string => !!c && c.trim() !== '')
  if (present.length === 0 || !present.every(isUnitCell)) return false
  const rt = bare(cells[header.kinds.get('rt')!.index])
  return rt === '' || timeUnitOf(rt) !== null || CLOCK_UNIT.test(rt)
}

const squash = (line: string) => line.trim().replace(/\s+/g, ' ')

/** The header printed again: after a page break, or at the start of another signal's table. */
function isRepeatedHeader(line: string, cells: (string | undefined)[] | null, header: HeaderCandidate, headerLine: string): boolean {
  if (line.includes(header.cells[0]!.text) && squash(line) === headerLine) return true
  if (!cells) return false
  const rt = header.kinds.get('rt')!.index
  const area = (header.kinds.get('area') ?? header.kinds.get('areaPercent'))?.index
  return classifyHeader(cells[rt] ?? '').kind === 'rt' && area !== undefined && classifyHeader(cells[area] ?? '').kind !== null
}

/**
 * Whether isRepeatedHeader needs asking: a line without words that does not hold the header's
 * first name, and whose retention-time cell is a plain number, can be neither the header line
 * nor a header row (a plain number is never a column name).
 */
function mayRepeatHeader(words: boolean, line: string, cells: (string | undefined)[] | null, header: HeaderCandidate): boolean {
  if (words || !cells || line.includes(header.cells[0]!.text)) return true
  return plainKind(cells[header.kinds.get('rt')!.index] ?? '') === NOT_PLAIN
}

/** A line that does not fit the columns and reads as words ("GC bay 2 - injection report"), not as a row of numbers. */
function looksLikeText(line: string): boolean {
  const tokens = line.trim().split(/\s+/)
  return /^\p{L}/u.test(tokens[0]!) && tokens.filter(looksNumeric).length <= 1
}

export interface RawRow { row: number, cells: (string | undefined)[] }
interface TextLine { row: number, cells: (string | undefined)[] | null, text: string }

/**
 * The data rows under the header. Report furniture (page marks, "End of report", printing and
 * signature lines) is skipped wherever it is; text after the last peak is a footer; text
 * between peaks is kept as a row so that it is refused.
 */
export function collectRows(
  lines: string[],
  header: HeaderCandidate,
  warnings: string[],
): { rows: RawRow[], unitsRow: (string | undefined)[] | null, errors: LayoutError[] } {
  const errors: LayoutError[] = []
  const rows: RawRow[] = []
  let pending: TextLine[] = []
  let unitsRow: (string | undefined)[] | null = null
  let pageBreak = false
  let reprinted = false
  const headerLine = squash(lines[header.row - 1]!)
  const skip = (row: number, text: string) => warnings.push(`Row ${row} is not part of the table ("${excerpt(text)}") and was skipped.`)
  for (let i = header.row; i < lines.length; i++) {
    const raw = lines[i]!
    const line = raw.includes('\f') ? raw.replace(/\f/g, ' ') : raw
    if (line !== raw) pageBreak = true
    if (line.trim() === '' || SEPARATOR_LINE.test(line)) continue
    // Furniture and totals start with a word (or a sum sign): a row of bare numbers needs neither test.
    const words = LETTER.test(line) || !fastPaths.enabled
    const totalsPossible = words || line.includes('\u2211')
    const furniture = words ? furnitureOf(line) : null
    if (furniture && furniture !== 'label') {
      if (furniture === 'page') pageBreak = true
      skip(i + 1, line)
      continue
    }
    if (totalsPossible && TOTALS.test(line.trim())) {
      warnings.push(`Row ${i + 1} looks like a totals row and was skipped.`)
      continue
    }
    const cells = rowCells(line, header)
    if (mayRepeatHeader(words, line, cells, header) && isRepeatedHeader(line, cells, header, headerLine)) {
      if (rows.length > 0 && !pageBreak) {
        // Reports with several detector signals repeat the table; the first one is the product run.
        warnings.push(`A second table starts at row ${i + 1}; only the first table was read.`)
        break
      }
      for (const t of pending) skip(t.row, t.text)
      pending = []
      pageBreak = false
      reprinted = true
      continue
    }
    // After a page break, words before the reprinted header are the page's heading.
    if (furniture === 'label' || (!cells && pageBreak) || ((!cells || pageBreak) && looksLikeText(line))) {
      if (rows.length === 0) skip(i + 1, line)
      else pending.push({ row: i + 1, cells, text: line })
      continue
    }
    if (!cells) {
      errors.push({ row: i + 1, code: 'misaligned', message: `Row ${i + 1}: the values do not line up with the header columns.` })
      continue
    }
    if ((rows.length === 0 || reprinted) && isUnitsRow(cells, header)) {
      unitsRow = unitsRow ?? cells
      reprinted = false
      continue
    }
    reprinted = false
    const filled = cells.filter((c): c is string => c !== undefined && c.trim() !== '')
    if (totalsPossible && filled.some((c) => TOTALS.test(c.trim()))) {
      warnings.push(`Row ${i + 1} looks like a totals row and was skipped.`)
      continue
    }
    if (filled.length === 1 && !looksNumeric(filled[0]!)) {
      skip(i + 1, filled[0]!)
      continue
    }
    // A text-only line after the peaks ("Printed by,lab3") is a footer, unless more peaks follow it.
    if (rows.length > 0 && filled.every((c) => !looksNumeric(c))) {
      pending.push({ row: i + 1, cells, text: filled.join(' ') })
      continue
    }
    for (const t of pending) {
      if (t.cells) rows.push({ row: t.row, cells: t.cells })
      else errors.push({ row: t.row, code: 'misaligned', message: `Row ${t.row}: the values do not line up with the header columns.` })
    }
    if (pending.length) pending = []
    if (header.delimiter === ',' && filled.length > header.cells.length) {
      errors.push({
        row: i + 1,
        code: 'misaligned',
        message: `Row ${i + 1} has more values than the header has columns: a name or number containing a comma must be quoted (or export with semicolons or tabs if the file uses decimal commas).`,
      })
      continue
    }
    rows.push({ row: i + 1, cells })
    pageBreak = false
  }
  for (const t of pending) warnings.push(`Row ${t.row} follows the table and holds no peak ("${excerpt(t.text)}"); it was skipped.`)
  return { rows, unitsRow, errors }
}

export type ColumnMap = Map<ColumnKind, { index: number, unit: string | null }>

/**
 * Column roles once the units row is known: an "Area" whose unit is "%" is the area %, and
 * the absolute area is then another "Area" column, if there is one.
 */
export function columnsOf(header: HeaderCandidate, unitsRow: (string | undefined)[] | null): ColumnMap {
  const kinds: ColumnMap = new Map(header.kinds)
  if (!unitsRow) return kinds
  const unitAt = (i: number) => bare(unitsRow[i])
  const percent = header.cells.map((c, i) => i)
    .filter((i) => unitAt(i) === '%' && classifyHeader(`${header.cells[i]!.text} %`).kind === 'areaPercent')
  if (percent.length === 0) return kinds
  const area = kinds.get('area')
  if (area && unitAt(area.index) === '%') {
    const absolute = header.cells.findIndex((c, i) => unitAt(i) !== '%' && classifyHeader(c.text).kind === 'area')
    if (absolute >= 0) kinds.set('area', { index: absolute, unit: unitAt(absolute) || null })
    else kinds.delete('area')
  }
  if (!kinds.has('areaPercent')) kinds.set('areaPercent', { index: percent[0]!, unit: '%' })
  return kinds
}

export function declaredTimeUnit(header: HeaderCandidate, unitsRow: (string | undefined)[] | null): TimeUnit | null {
  const rt = header.kinds.get('rt')!
  return timeUnitOf(rt.unit) ?? timeUnitOf(bare(unitsRow?.[rt.index]) || null)
}
