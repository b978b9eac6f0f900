// Numbers as instrument exports print them. Either "." or "," may be the decimal mark; the other
// one, a space, a no-break space or an apostrophe may group thousands; times may be m:ss. A cell
// like "45,769" reads two ways, so each column gets one decimal mark from evidence in the file
// (never from the delimiter's habit), and what stays ambiguous is refused with both readings.
import { messageExcerpt } from '../text-input'

export type Mark = '.' | ','

interface Scan {
  negative: boolean
  /** Digit runs and the separators between them: '.', ',' or 'g' (space-like or apostrophe). */
  runs: string[]
  seps: string[]
  exponent: string
  /** ".5": the text starts with a mark. */
  leadingMark: boolean
}

const GROUP_CHARS = new Set([' ', '\u00a0', '\u202f', '\u2009', '\u2007', '\'', '\u2019'])

/** Quotes, a trailing "%" and surrounding space are dropped; U+2212 is the typographic minus. */
export function cleanNumberText(raw: string): string {
  let s = raw.trim()
  if (s.length > 1 && s.charCodeAt(0) === 34 && s.charCodeAt(s.length - 1) === 34) s = s.slice(1, -1).trim()
  if (s.endsWith('%')) s = s.slice(0, -1).trim()
  return s
}

function scan(s: string): Scan | null {
  let i = 0
  let negative = false
  const first = s[0]
  if (first === '-' || first === '+' || first === '\u2212') {
    negative = first !== '+'
    i = 1
  }
  const runs: string[] = []
  const seps: string[] = []
  let run = ''
  let leadingMark = false
  let exponent = ''
  for (; i < s.length; i++) {
    const c = s[i]!
    if (c >= '0' && c <= '9') { run += c; continue }
    if (c === '.' || c === ',') {
      if (run === '' && runs.length === 0 && !leadingMark) { leadingMark = true; seps.push(c); runs.push(''); continue }
      if (run === '') return null
      runs.push(run); seps.push(c); run = ''
      continue
    }
    if (GROUP_CHARS.has(c)) {
      // A group space sits between digits: "15 234", never "15 ,5".
      if (run === '' || !(s[i + 1]! >= '0' && s[i + 1]! <= '9')) return null
      runs.push(run); seps.push('g'); run = ''
      continue
    }
    if ((c === 'e' || c === 'E') && (run !== '' || runs.length > 0)) {
      exponent = s.slice(i + 1)
      if (!/^[+-]?\d{1,4}$/.test(exponent)) return null
      exponent = `e${exponent}`
      break
    }
    return null
  }
  runs.push(run)
  if (runs.every((r) => r === '')) return null
  return { negative, runs, seps, exponent, leadingMark }
}

function validGroups(groups: string[]): boolean {
  const head = groups[0]!
  if (head === '' || head[0] === '0') return false
  const tail = groups.slice(1)
  if (head.length <= 3 && tail.every((g) => g.length === 3)) return true
  // South Asian grouping: 12,34,567 (the last group three digits, the others two).
  return head.length <= 2 && tail.length >= 2 && tail[tail.length - 1]!.length === 3 && tail.slice(0, -1).every((g) => g.length === 2)
}

export interface NumberReading {
  value: number
  /** The integer part carries a group separator. */
  grouped: boolean
  /** Digits in the integer part. */
  intDigits: number
  /** The cell also reads as another number with the other mark as decimal ("1.234"). */
  ambiguous: boolean
}

/** The cell read with `decimal` as its decimal mark; null when it cannot be written that way. */
function readAs(sc: Scan, decimal: Mark): NumberReading | null {
  const { runs, seps } = sc
  let dec = -1
  for (let k = 0; k < seps.length; k++) {
    if (seps[k] !== decimal) continue
    if (dec >= 0) return null
    dec = k
  }
  if (dec >= 0 && dec !== seps.length - 1) return null
  const groupSeps = dec >= 0 ? seps.slice(0, dec) : seps
  const intRuns = dec >= 0 ? runs.slice(0, dec + 1) : runs
  if (sc.leadingMark && dec !== 0) return null
  const grouped = groupSeps.length > 0
  if (grouped) {
    if (sc.exponent || groupSeps.some((g) => g !== groupSeps[0]) || !validGroups(intRuns)) return null
  }
  const whole = intRuns.join('')
  const fraction = dec >= 0 ? runs[dec + 1]! : ''
  const value = Number(`${sc.negative ? '-' : ''}${whole || '0'}.${fraction || '0'}${sc.exponent}`)
  return { value, grouped, intDigits: whole.replace(/^0+(?=\d)/, '').length, ambiguous: false }
}

/** m:ss(.f) or h:mm:ss(.f), in minutes; the fraction mark is then surely the decimal. */
const CLOCK = /^(\d{1,2}:)?(\d{1,4}):([0-5]\d)(?:([.,])(\d+))?$/

function readClock(s: string): { minutes: number, mark: Mark | null } | null {
  const m = CLOCK.exec(s)
  if (!m) return null
  if (m[1] && Number(m[2]) > 59) return null
  const hours = m[1] ? Number(m[1].slice(0, -1)) : 0
  const seconds = Number(`${m[3]}.${m[5] ?? '0'}`)
  return { minutes: hours * 60 + Number(m[2]) + seconds / 60, mark: (m[4] as Mark | undefined) ?? null }
}

/** A cell read both ways, once: with "." and with "," as the decimal mark. */
export type CellAnalysis =
  | { kind: 'empty' }
  | { kind: 'bad' }
  | { kind: 'clock', minutes: number, mark: Mark | null }
  | { kind: 'number', dot: NumberReading | null, comma: NumberReading | null, mark: Mark | null }

const EMPTY: CellAnalysis = { kind: 'empty' }
const BAD: CellAnalysis = { kind: 'bad' }

export function analyseCell(raw: string): CellAnalysis {
  const s = cleanNumberText(raw)
  if (s === '') return EMPTY
  const quick = quickAnalysis(s)
  if (quick) return quick
  if (s.includes(':')) {
    const clock = readClock(s)
    return clock ? { kind: 'clock', ...clock } : BAD
  }
  const sc = scan(s)
  if (!sc) return BAD
  const dot = readAs(sc, '.')
  const comma = readAs(sc, ',')
  if (!dot && !comma) return BAD
  const mark: Mark | null = sc.seps.includes(',') ? ',' : sc.seps.includes('.') ? '.' : null
  if (dot && comma && mark) dot.ambiguous = comma.ambiguous = true
  return { kind: 'number', dot, comma, mark }
}

/** "123", "-0.5", "2,5", "1.234": digits with at most one mark, read without building a scan. */
function quickAnalysis(s: string): CellAnalysis | null {
  if (s.length > 24) return null
  let mark = -1
  const from = s.charCodeAt(0) === 45 ? 1 : 0
  for (let i = from; i < s.length; i++) {
    const c = s.charCodeAt(i)
    if (c >= 48 && c <= 57) continue
    if ((c === 46 || c === 44) && mark < 0 && i > from && i < s.length - 1) { mark = i; continue }
    return null
  }
  if (s.length === from) return null
  if (mark < 0) {
    const r: NumberReading = { value: Number(s), grouped: false, intDigits: digitsOf(s.slice(from)), ambiguous: false }
    return { kind: 'number', dot: r, comma: r, mark: null }
  }
  const whole = s.slice(from, mark)
  const fraction = s.slice(mark + 1)
  const c = s[mark] as Mark
  const groupable = whole.length <= 3 && whole[0] !== '0' && fraction.length === 3
  const asDecimal: NumberReading = {
    // With a point the text is already the number: no need to build it again.
    value: Number(c === '.' ? s : `${s.slice(0, mark)}.${fraction}`), grouped: false, intDigits: digitsOf(whole), ambiguous: groupable,
  }
  const asGroup: NumberReading | null = groupable
    ? { value: Number(s.slice(0, mark) + fraction), grouped: true, intDigits: whole.length + 3, ambiguous: true }
    : null
  return c === '.'
    ? { kind: 'number', dot: asDecimal, comma: asGroup, mark: c }
    : { kind: 'number', dot: asGroup, comma: asDecimal, mark: c }
}

const digitsOf = (whole: string) => whole.replace(/^0+(?=\d)/, '').length

export interface Tally {
  sure: Record<Mark, number>
  ambiguous: Record<Mark, number>
  clock: number
  numbers: number
}

export const emptyTally = (): Tally => ({ sure: { '.': 0, ',': 0 }, ambiguous: { '.': 0, ',': 0 }, clock: 0, numbers: 0 })

/** Counts one analysed cell into a column's tally. */
export function tallyCell(t: Tally, a: CellAnalysis): void {
  if (a.kind === 'empty' || a.kind === 'bad') return
  t.numbers++
  if (a.kind === 'clock') {
    t.clock++
    if (a.mark) t.sure[a.mark]++
  } else if (a.mark) {
    if (a.dot && a.comma) t.ambiguous[a.mark]++
    else t.sure[a.dot ? '.' : ',']++
  }
}

export function tallyColumn(cells: Iterable<CellAnalysis | string>): Tally {
  const t = emptyTally()
  for (const cell of cells) tallyCell(t, typeof cell === 'string' ? analyseCell(cell) : cell)
  return t
}

export interface ColumnStyle {
  /** The column's decimal mark; null when nothing in the file tells (ambiguous cells are then refused). */
  decimal: Mark | null
  /** The column's cells use both marks: cells with the minority mark (or, with no decimal, any mark) are refused. */
  mixed: boolean
  /** Times written m:ss; plain numbers in such a column are refused. */
  clock: boolean
  /** Where the decimal mark came from. */
  evidence: 'column' | 'file' | 'retention-time' | 'none'
}

/**
 * One decimal mark per column: the column's own unambiguous cells decide; else the file's,
 * when every unambiguous cell elsewhere agrees; else the retention-time column's, whose lone
 * mark before three digits ("3,430") is taken as its decimal (integrators print retention
 * times with decimals and never group them by thousands: common practice); else none.
 */
export function decideStyles(tallies: Tally[], rtIndex: number | null): ColumnStyle[] {
  const fileDot = tallies.reduce((n, t) => n + t.sure['.'], 0)
  const fileComma = tallies.reduce((n, t) => n + t.sure[','], 0)
  const fileMark: Mark | null = fileDot && !fileComma ? '.' : fileComma && !fileDot ? ',' : null
  const rt = rtIndex === null ? undefined : tallies[rtIndex]
  const rtMark: Mark | null = rt && !rt.sure['.'] && !rt.sure[','] && (rt.ambiguous['.'] > 0) !== (rt.ambiguous[','] > 0)
    ? (rt.ambiguous['.'] ? '.' : ',')
    : null
  return tallies.map((t): ColumnStyle => {
    const clock = t.clock > 0 && t.clock * 2 >= t.numbers
    const dot = t.sure['.']
    const comma = t.sure[',']
    if (dot || comma) {
      if (dot === comma) return { decimal: null, mixed: true, clock, evidence: 'column' }
      return { decimal: dot > comma ? '.' : ',', mixed: dot > 0 && comma > 0, clock, evidence: 'column' }
    }
    // "2,514" beside "3.087": one of them is not what it seems. The file's mark, if any, says which.
    if (t.ambiguous['.'] && t.ambiguous[',']) return { decimal: fileMark, mixed: true, clock, evidence: fileMark ? 'file' : 'none' }
    if (fileMark) return { decimal: fileMark, mixed: false, clock, evidence: 'file' }
    if (rtMark) return { decimal: rtMark, mixed: false, clock, evidence: 'retention-time' }
    return { decimal: null, mixed: false, clock, evidence: 'none' }
  })
}

export type ReadProblem =
  | { kind: 'not-a-number' }
  | { kind: 'too-large' }
  | { kind: 'ambiguous', mark: Mark, readings: [string, string] }
  | { kind: 'mixed', decimal: Mark | null }
  | { kind: 'clock-mix' }

export type CellRead = NumberReading | { problem: ReadProblem } | null

/** Reads a cell in its column's style: a number, a problem for the row's message, or null when empty. */
export function readCell(raw: string | CellAnalysis, style: ColumnStyle): CellRead {
  const a = typeof raw === 'string' ? analyseCell(raw) : raw
  if (a.kind === 'empty') return null
  if (a.kind === 'bad') return { problem: { kind: 'not-a-number' } }
  if (a.kind === 'clock') {
    if (!style.clock) return { problem: { kind: 'clock-mix' } }
    if (a.mark && style.decimal && a.mark !== style.decimal) return { problem: { kind: 'mixed', decimal: style.decimal } }
    return { value: a.minutes, grouped: false, intDigits: 0, ambiguous: false }
  }
  if (style.clock) return { problem: { kind: 'clock-mix' } }
  const { dot, comma, mark } = a
  let r: NumberReading | null
  if (mark === null) r = dot
  // In a column that mixes marks, nothing that rests on the minority mark is read, not even as a group.
  else if (style.mixed && mark !== style.decimal) return { problem: { kind: 'mixed', decimal: style.decimal } }
  else if (style.decimal === null) {
    // The reading that takes the mark for a thousands separator first: "45,769 could be 45769 or 45.769".
    const [grouping, decimal] = mark === ',' ? [dot, comma] : [comma, dot]
    if (grouping && decimal) return { problem: { kind: 'ambiguous', mark, readings: [String(grouping.value), String(decimal.value)] } }
    r = dot ?? comma
  } else {
    r = style.decimal === '.' ? dot : comma
    if (!r) return { problem: { kind: 'mixed', decimal: style.decimal } }
  }
  if (!Number.isFinite(r!.value)) return { problem: { kind: 'too-large' } }
  return r
}

/**
 * A column that writes "98765" without a separator does not group thousands, so a "45,769" in
 * it may not be a grouped 45769 either (locales that leave four-digit numbers ungrouped, such
 * as "1234" beside "12 345", are allowed). Returns the index of the cell that shows the column
 * ungrouped, or -1 when grouping is consistent.
 */
export function ungroupedWitness(reads: CellRead[]): number {
  let widest = -1
  let widestDigits = 0
  let groupedFour = false
  let anyGrouped = false
  reads.forEach((r, i) => {
    if (!r || 'problem' in r) return
    if (r.grouped) {
      anyGrouped = true
      if (r.intDigits === 4) groupedFour = true
    } else if (r.intDigits > widestDigits) {
      widestDigits = r.intDigits
      widest = i
    }
  })
  if (!anyGrouped) return -1
  return widestDigits >= 5 || (widestDigits === 4 && groupedFour) ? widest : -1
}

/** At most `max` characters of a cell for a message, with "…" when cut, and no markup or controls. */
export function excerpt(text: string, max = 40): string {
  return messageExcerpt(text, max)
}

/** A cheap test for "this cell is meant as a number" (used to tell data rows from text). */
export function looksNumeric(raw: string): boolean {
  const s = cleanNumberText(raw)
  if (s === '') return false
  let digit = false
  for (let i = 0; i < s.length; i++) {
    const c = s[i]!
    if (c >= '0' && c <= '9') { digit = true; continue }
    if (c === '.' || c === ',' || c === ':' || GROUP_CHARS.has(c)) continue
    // A sign only leads the number or its exponent, so a date ("2026-11-03") is not a number.
    if ((c === '-' || c === '+' || c === '\u2212') && (i === 0 || s[i - 1] === 'e' || s[i - 1] === 'E')) continue
    if ((c === 'e' || c === 'E') && digit) continue
    return false
  }
  return digit
}
