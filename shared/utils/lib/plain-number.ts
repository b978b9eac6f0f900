// The fast path for number cells. Most exports write plain decimals ("12", "-0.5", "1234.56"),
// and for those the locale rules of number-text.ts always end the same way: the text is the
// number. Recognising them with one pass over the characters, before building an analysis of
// each cell, is most of the difference between reading a large file and splitting it.
// Everything else (decimal commas, groups, exponents, m:ss, quotes, "%", space, a "+" or U+2212
// sign) goes the general way; tests/unit/plain-number.test.ts checks that both paths agree.
import { type CellAnalysis, type CellRead, type ColumnStyle, type Tally, analyseCell, emptyTally, readCell, tallyCell } from './number-text'

/** plainKind's answers: not plain; an integer; a point decimal; a point decimal that could also be a thousands group ("1.234"). */
export const NOT_PLAIN = 0
export const PLAIN_INTEGER = 1
export const PLAIN_POINT = 2
export const PLAIN_POINT_OR_GROUP = 3

// Past this many characters the general path's own shortcut stops too; such cells are rare.
const MAX_PLAIN_LENGTH = 24

/**
 * Off, every shortcut of the readers (plain decimals here, text-only cells and the skipped word
 * tests of table-layout.ts, the one-pass reader of plain tables in plain-table.ts) takes the
 * general path instead: the tests read the same files both ways and compare. Always on in the product.
 */
export const fastPaths = { enabled: true }

/** What kind of plain decimal a cell is: an optional "-", digits, at most one "." between digits. */
export function plainKind(s: string): number {
  const n = s.length
  if (n === 0 || n > MAX_PLAIN_LENGTH || !fastPaths.enabled) return NOT_PLAIN
  const from = s.charCodeAt(0) === 45 ? 1 : 0
  let mark = -1
  for (let i = from; i < n; i++) {
    const c = s.charCodeAt(i)
    if (c >= 48 && c <= 57) continue
    if (c === 46 && mark < 0 && i > from && i < n - 1) { mark = i; continue }
    return NOT_PLAIN
  }
  if (n === from) return NOT_PLAIN
  if (mark < 0) return PLAIN_INTEGER
  // "1.234" reads as 1234 where the point groups thousands: three digits after, one to three before, no leading zero.
  return mark - from <= 3 && s.charCodeAt(from) !== 48 && n - mark - 1 === 3 ? PLAIN_POINT_OR_GROUP : PLAIN_POINT
}

/** Digits of the integer part without leading zeros (at least one), as NumberReading.intDigits counts them. */
function intDigits(s: string, kind: number): number {
  const end = kind === PLAIN_INTEGER ? s.length : s.indexOf('.')
  let i = s.charCodeAt(0) === 45 ? 1 : 0
  while (i < end - 1 && s.charCodeAt(i) === 48) i++
  return end - i
}

/** The style reads a plain cell of this kind as the text's own number (readCell's answer, worked out once). */
function readsAsWritten(kind: number, style: ColumnStyle): boolean {
  return !style.clock && (kind === PLAIN_INTEGER || style.decimal === '.')
}

/** A cell's number when it is a plain decimal its column's style reads as written; undefined when readCell must decide. */
export function readPlain(cell: string, style: ColumnStyle): number | undefined {
  const kind = plainKind(cell)
  return kind !== NOT_PLAIN && readsAsWritten(kind, style) ? Number(cell) : undefined
}

function tallyPlain(t: Tally, kind: number): void {
  t.numbers++
  if (kind === PLAIN_POINT) t.sure['.']++
  else if (kind === PLAIN_POINT_OR_GROUP) t.ambiguous['.']++
}

/** tallyColumn over cell texts, counting plain decimals without analysing them. */
export function tallyCells(cells: readonly string[]): Tally {
  const t = emptyTally()
  for (const cell of cells) {
    const kind = plainKind(cell)
    if (kind !== NOT_PLAIN) tallyPlain(t, kind)
    else if (cell !== '') tallyCell(t, analyseCell(cell))
  }
  return t
}

/** A column's cells with their kinds found once: a tally now, readings once the style is known. */
export interface ScannedColumn {
  cells: readonly string[]
  kinds: Uint8Array
  /** Analyses of the cells that are not plain (undefined where plain). */
  analyses: (CellAnalysis | undefined)[]
  tally: Tally
}

export function scanColumn(cells: readonly string[]): ScannedColumn {
  const kinds = new Uint8Array(cells.length)
  const analyses: (CellAnalysis | undefined)[] = new Array(cells.length)
  const tally = emptyTally()
  for (let i = 0; i < cells.length; i++) {
    const kind = plainKind(cells[i]!)
    kinds[i] = kind
    if (kind !== NOT_PLAIN) {
      tallyPlain(tally, kind)
    } else {
      const a = analyseCell(cells[i]!)
      analyses[i] = a
      tallyCell(tally, a)
    }
  }
  return { cells, kinds, analyses, tally }
}

/** A column read in its style: the plain cells' numbers, and readCell's answer for every other cell. */
export interface ColumnReads {
  /** The number of each plain cell the style reads as written; NaN for the others. */
  plain: Float64Array
  /** readCell's reading of each other cell (a hole where `plain` holds the number). */
  others: CellRead[]
}

/**
 * Every cell read in the column's style: a plain cell the style reads as written becomes its own
 * number, any other cell goes through readCell. readingAt gives the full reading of any cell.
 */
export function readScanned(column: ScannedColumn, style: ColumnStyle): ColumnReads {
  const { cells, kinds, analyses } = column
  const plain = new Float64Array(cells.length)
  const others: CellRead[] = new Array(cells.length)
  for (let i = 0; i < cells.length; i++) {
    const kind = kinds[i]!
    if (kind !== NOT_PLAIN && readsAsWritten(kind, style)) {
      plain[i] = Number(cells[i])
    } else {
      plain[i] = Number.NaN
      others[i] = readCell(analyses[i] ?? cells[i]!, style)
    }
  }
  return { plain, others }
}

/** Cell i's reading exactly as readCell gives it (with the digit count and the "could be a group" mark). */
export function readingAt(column: ScannedColumn, reads: ColumnReads, i: number): CellRead {
  const value = reads.plain[i]!
  if (Number.isNaN(value)) return reads.others[i]!
  const kind = column.kinds[i]!
  return { value, grouped: false, intDigits: intDigits(column.cells[i]!, kind), ambiguous: kind === PLAIN_POINT_OR_GROUP }
}
