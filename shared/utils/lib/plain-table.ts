// The fast pass for peak tables: a table whose every line under the header is blank or a row of
// plain decimals (digits, "-", "." and the delimiter, nothing else) is read in one pass over the
// characters, each number straight from its digits, with no cell strings and no row arrays.
// Such a table leaves the general path (collectRows, readColumns, readPeakRows) nothing to
// decide: no units row, furniture, totals, quotes, groups or marks to weigh. Anything else, and
// any row the general path would refuse or warn about, makes the pass give up (null) and the
// general path read the whole table: it stays the one place where the rules live.
// tests/unit/plain-table.test.ts reads generated tables both ways and compares.
import { type ColumnStyle, type Tally, decideStyles, emptyTally } from './number-text'
import type { Delimiter } from './table-text'

/** A number column the table is read for, as peak-table.ts's columnSpecs lists them. */
export interface PlainColumn {
  key: 'rt' | 'area' | 'areaPercent' | 'height'
  what: string
  index: number
}

export interface PlainPeak {
  retentionTime: number
  area: number
  areaPercent?: number
  height?: number
  row: number
}

export interface PlainTable {
  peaks: PlainPeak[]
  /** The columns' styles as decideStyles gives them for these cells. */
  styles: ColumnStyle[]
  /** Names of optional columns with a value out of range, in the order first met. */
  leftOut: Set<string>
}

export interface PlainTableLimits {
  maxRows: number
  /** The largest area (area % when the areas are area %). */
  areaLimit: number
  /** The largest height. */
  heightLimit: number
  fromPercent: boolean
  /** 1-based line of the header; data start on the next line. */
  headerRow: number
  headerCells: number
  /** The header's first cell: a data line holding it is asked whether it repeats the header. */
  headerFirst: string
}

const DIGIT_0 = 48
const DIGIT_9 = 57
const MINUS = 45
const POINT = 46
const SPACE = 32
const TAB = 9
const LF = 10
const CR = 13
// A mantissa of at most 15 digits and a divisor 10^k (k <= 15) are both exact doubles, so their
// quotient is the correctly rounded value of the decimal: the number Number() gives for the text.
const EXACT_DIGITS = 15
const POW10 = Array.from({ length: EXACT_DIGITS + 1 }, (_, k) => 10 ** k)
// plainKind's limit: longer cells go the general way.
const MAX_PLAIN_LENGTH = 24

/** A text the data lines cannot contain, so no line can hold it and repeat the header. */
function outsideCharset(text: string, delimiter: Delimiter): boolean {
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i)
    if ((c < DIGIT_0 || c > DIGIT_9) && c !== MINUS && c !== POINT && !isSeparator(c, delimiter)) return true
  }
  return false
}

function isSeparator(c: number, delimiter: Delimiter): boolean {
  return delimiter === 'whitespace' ? c === SPACE || c === TAB : c === delimiter.charCodeAt(0)
}

/** The offset where line `index` (0-based) of the text starts, as splitLines counts lines; -1 past the end. */
function lineStart(text: string, index: number): number {
  let at = text.charCodeAt(0) === 0xfeff ? 1 : 0
  for (let line = 0; line < index; line++) {
    while (at < text.length && !isLineEnd(text.charCodeAt(at))) at++
    if (at >= text.length) return -1
    at += text.charCodeAt(at) === CR && text.charCodeAt(at + 1) === LF ? 2 : 1
  }
  return at
}

const isLineEnd = (c: number) => c === LF || c === CR

/** Whether the line from `at` is blank as the general path sees it (nothing left once trimmed). */
function blankLine(text: string, at: number): boolean {
  let pos = at
  while (pos < text.length && (text.charCodeAt(pos) === SPACE || text.charCodeAt(pos) === TAB)) pos++
  const c = text.charCodeAt(pos)
  if (pos >= text.length || isLineEnd(c)) return true
  // Other white space (a no-break space, a vertical tab...) is rare: trim decides.
  if (c > SPACE && c < 0x80) return false
  let end = pos
  while (end < text.length && !isLineEnd(text.charCodeAt(end))) end++
  return text.slice(at, end).trim() === ''
}

/** The last line that is not blank holds only what a plain row may: digits, "-", "." and separators. */
function plainLastLine(text: string, delimiter: Delimiter): boolean {
  let end = text.length
  while (end > 0 && isBlankChar(text.charCodeAt(end - 1))) end--
  let start = end
  while (start > 0 && !isLineEnd(text.charCodeAt(start - 1))) start--
  for (let i = start; i < end; i++) {
    const c = text.charCodeAt(i)
    if ((c < DIGIT_0 || c > DIGIT_9) && c !== MINUS && c !== POINT && !isSeparator(c, delimiter) && c !== SPACE && c !== TAB) return false
  }
  return true
}

const isBlankChar = (c: number) => c === LF || c === CR || c === SPACE || c === TAB

/**
 * The table's peaks when every line under the header is blank or a row of plain decimals that
 * the general path would read as a clean peak; null when the general path must read it. The
 * text is read where it lies, line ends found as splitLines finds them: no line strings at all.
 */
export function readPlainTable(
  text: string, delimiter: Delimiter, columns: readonly PlainColumn[], limits: PlainTableLimits,
): PlainTable | null {
  if (limits.headerFirst === '' || !outsideCharset(limits.headerFirst, delimiter)) return null
  const whitespace = delimiter === 'whitespace'
  const sep = whitespace ? SPACE : delimiter.charCodeAt(0)
  const width = columns.reduce((n, c) => Math.max(n, c.index + 1), 0)
  // The column each cell feeds (-1: none).
  const feeds = new Int8Array(width).fill(-1)
  columns.forEach((c, k) => { feeds[c.index] = k })
  const tallies: Tally[] = columns.map(emptyTally)
  const values = new Float64Array(columns.length)
  const extras = columns.slice(2)
  const peaks: PlainPeak[] = []
  const leftOut = new Set<string>()
  let lastTime = Number.NEGATIVE_INFINITY
  const total = text.length
  // A footer or totals row ends most tables that are not plain: seen first, it spares the pass reading the whole table in vain.
  if (!plainLastLine(text, delimiter)) return null
  let at = lineStart(text, limits.headerRow)
  // Line index of the line starting at `at` (row = index + 1).
  let index = limits.headerRow - 1

  for (; at >= 0 && at < total; at += text.charCodeAt(at) === CR && text.charCodeAt(at + 1) === LF ? 2 : 1) {
    index++
    const first = text.charCodeAt(at)
    // Blank as the general path sees it (trimmed empty); a line starting with a digit, "-" or "." is not.
    if (!(first >= DIGIT_0 && first <= DIGIT_9) && first !== MINUS && first !== POINT && blankLine(text, at)) {
      while (at < total && !isLineEnd(text.charCodeAt(at))) at++
      continue
    }
    // Bit k: column k has a number on this line.
    let present = 0
    let cell = 0
    let filled = 0
    let blank = true
    let pos = at
    for (;;) {
      // Whitespace columns: runs of spaces and tabs separate, and the line's ends do not count.
      if (whitespace) {
        while (pos < total && (text.charCodeAt(pos) === SPACE || text.charCodeAt(pos) === TAB)) pos++
        if (pos >= total || isLineEnd(text.charCodeAt(pos))) break
      }
      const start = pos
      let negative = false
      let mark = -1
      let mantissa = 0
      let digits = 0
      let plain = true
      if (pos < total && text.charCodeAt(pos) === MINUS) { negative = true; pos++ }
      const from = pos
      for (; pos < total; pos++) {
        const c = text.charCodeAt(pos)
        if (c >= DIGIT_0 && c <= DIGIT_9) {
          if (digits < EXACT_DIGITS) mantissa = mantissa * 10 + (c - DIGIT_0)
          digits++
        } else if (c === sep || (whitespace && c === TAB) || c === LF || c === CR) {
          break
        } else if (c === POINT) {
          if (mark >= 0 || pos === from) plain = false
          mark = pos
        } else if (c === MINUS) {
          plain = false
        } else {
          // A space in a delimited file, a letter, a quote, a comma in a semicolon file: the general path's to read.
          return null
        }
      }
      const end = pos
      if (end > start) { filled++; blank = false }
      const k = cell < width ? feeds[cell]! : -1
      if (k >= 0 && end > start) {
        const length = end - start
        if (!plain || digits === 0 || mark === end - 1 || length > MAX_PLAIN_LENGTH) return null
        const t = tallies[k]!
        t.numbers++
        let value: number
        if (mark < 0) {
          value = digits > EXACT_DIGITS ? Number(text.slice(from, end)) : mantissa
        } else {
          // "1.234" could group thousands (plainKind's PLAIN_POINT_OR_GROUP): one to three digits before, no leading zero, three after.
          const fraction = end - mark - 1
          if (mark - from <= 3 && text.charCodeAt(from) !== DIGIT_0 && fraction === 3) t.ambiguous['.']++
          else t.sure['.']++
          value = digits > EXACT_DIGITS ? Number(text.slice(from, end)) : mantissa / POW10[fraction]!
        }
        values[k] = negative ? -value : value
        present |= 1 << k
      }
      cell++
      if (pos >= total || isLineEnd(text.charCodeAt(pos))) break
      pos++
    }
    at = pos
    // A line of bare delimiters is a row the general path refuses.
    if (blank) return null
    if (whitespace ? cell !== limits.headerCells : delimiter === ',' && filled > limits.headerCells) return null
    if ((present & 3) !== 3) return null
    const retentionTime = values[0]!
    const area = values[1]!
    // A clean row: in range, and a time later than every earlier one (so never a repeat).
    if (!(retentionTime >= 0 && area >= 0 && area <= limits.areaLimit && retentionTime > lastTime)) return null
    if (peaks.length === limits.maxRows) return null
    lastTime = retentionTime
    const peak: PlainPeak = { retentionTime, area, row: index + 1 }
    if (limits.fromPercent) peak.areaPercent = area
    for (let e = 0; e < extras.length; e++) {
      if (!(present & (1 << (e + 2)))) continue
      const col = extras[e]!
      const v = values[e + 2]!
      if (Math.abs(v) <= (col.key === 'areaPercent' ? 100 : limits.heightLimit)) peak[col.key as 'areaPercent' | 'height'] = v
      else leftOut.add(col.what)
    }
    peaks.push(peak)
  }
  if (peaks.length === 0) return null
  const styles = decideStyles(tallies, 0)
  // A point decimal is the text's own number only where the column reads points as decimals.
  for (let k = 0; k < columns.length; k++) {
    const t = tallies[k]!
    if (styles[k]!.clock || ((t.sure['.'] || t.ambiguous['.']) && styles[k]!.decimal !== '.')) return null
  }
  return { peaks, styles, leftOut }
}
