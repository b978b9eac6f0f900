// Text-level helpers for instrument exports: lines, delimiters, cells, header names, numbers
// and time units. Shared by the peak-table and trace parsers.
import Papa from 'papaparse'

export type Delimiter = ',' | ';' | '\t' | 'whitespace'
export type ColumnKind = 'rt' | 'area' | 'areaPercent' | 'height' | 'signal'
export type TimeUnit = 'min' | 's' | 'ms'

export interface Cell {
  text: string
  start: number
  end: number
}

/** Lines without BOM and line-ending noise; index i is file line i + 1. */
export function splitLines(text: string): string[] {
  return text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/)
}

export function utf8Length(text: string): number {
  let bytes = 0
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i)
    if (c < 0x80) bytes += 1
    else if (c < 0x800) bytes += 2
    else if (c >= 0xd800 && c < 0xdc00) { bytes += 4; i++ }
    else bytes += 3
  }
  return bytes
}

/** Splits one line. Quoted cells go through papaparse; plain ones take the fast path. */
export function splitCells(line: string, delimiter: Delimiter): Cell[] {
  if (delimiter === 'whitespace') {
    const cells: Cell[] = []
    const re = /\S+/g
    let m: RegExpExecArray | null
    while ((m = re.exec(line))) cells.push({ text: m[0], start: m.index, end: m.index + m[0].length })
    return cells
  }
  if (!line.includes('"')) {
    const cells: Cell[] = []
    let start = 0
    for (const part of line.split(delimiter)) {
      cells.push({ text: part.trim(), start, end: start + part.length })
      start += part.length + 1
    }
    return cells
  }
  const parsed = Papa.parse<string[]>(line, { delimiter, header: false })
  return (parsed.data[0] ?? []).map((text, i) => ({ text: text.trim(), start: i, end: i }))
}

/** Aligned text reports separate columns by runs of spaces; header names may hold single spaces. */
export function splitWideGaps(line: string): Cell[] {
  const cells: Cell[] = []
  const re = /\S+(?: \S+)*/g
  let m: RegExpExecArray | null
  while ((m = re.exec(line))) cells.push({ text: m[0], start: m.index, end: m.index + m[0].length })
  return cells
}

const RT_NAMES = new Set(['retentiontime', 'retentiontimes', 'rt', 'rtime', 'rettime', 'ret', 'time', 'retention', 'tr', 'tret', 'apexrt', 'rtapex', 'apextime', 'peaktime'])
const AREA_NAMES = new Set(['area', 'peakarea', 'areas', 'integratedarea', 'absarea', 'rawarea', 'areacounts', 'areasum'])
const HEIGHT_NAMES = new Set(['height', 'peakheight', 'ht', 'heights', 'maxheight'])
const AREA_PERCENT_BASES = new Set(['area', '', 'norm', 'peakarea', 'normarea', 'normalizedarea', 'relarea', 'relativearea'])
const SIGNAL_NAMES = new Set(['signal', 'intensity', 'response', 'detector', 'fid', 'y', 'value', 'abundance', 'counts', 'voltage', 'current', 'pa', 'mv', 'uv', 'detectorsignal'])

export interface HeaderName {
  kind: ColumnKind | null
  unit: string | null
}

const TIME_UNITS: Record<string, TimeUnit> = {
  min: 'min', mins: 'min', minute: 'min', minutes: 'min', m: 'min',
  s: 's', sec: 's', secs: 's', second: 's', seconds: 's',
  ms: 'ms', msec: 'ms', millisecond: 'ms', milliseconds: 'ms',
}

export function timeUnitOf(unit: string | null): TimeUnit | null {
  if (!unit) return null
  return TIME_UNITS[unit.trim().toLowerCase().replace(/\.$/, '')] ?? null
}

/** Classifies a header cell by meaning, tolerating units in brackets, after a slash or as a last word. */
export function classifyHeader(raw: string): HeaderName {
  let s = raw.trim().toLowerCase().replace(/^"+|"+$/g, '')
  let unit: string | null = null
  s = s.replace(/[[(]([^\])]*)[\])]/g, (_, u: string) => {
    unit = unit ?? u.trim()
    return ' '
  })
  const slash = s.match(/^(.*?)\s*\/\s*([a-zµ*%.\s]+)$/)
  // "Area/Height" is a ratio of two columns, not an area with a unit.
  if (slash && isColumnName(slash[2]!)) return { kind: null, unit: null }
  if (slash) {
    s = slash[1]!
    unit = unit ?? slash[2]!.trim()
  }
  s = s.replace(/[._\-:]/g, ' ').replace(/\s+/g, ' ').trim()
  const words = s.split(' ')
  const last = words[words.length - 1] ?? ''
  if (words.length > 1 && TIME_UNITS[last]) {
    unit = unit ?? last
    s = words.slice(0, -1).join(' ')
  }
  const compact = s.replace(/\s/g, '')
  const percent = /%|pct|percent|perc\b/.test(compact) || unit === '%'
  const base = compact.replace(/%|pct|percent|perc/g, '')
  if (percent && AREA_PERCENT_BASES.has(base)) return { kind: 'areaPercent', unit: '%' }
  if (percent) return { kind: null, unit }
  if (RT_NAMES.has(compact)) return { kind: 'rt', unit }
  if (AREA_NAMES.has(compact)) return { kind: 'area', unit }
  if (HEIGHT_NAMES.has(compact)) return { kind: 'height', unit }
  if (SIGNAL_NAMES.has(compact)) return { kind: 'signal', unit }
  return { kind: null, unit }
}

function isColumnName(text: string): boolean {
  const compact = text.replace(/[\s._\-:]/g, '')
  return RT_NAMES.has(compact) || AREA_NAMES.has(compact) || HEIGHT_NAMES.has(compact) || ['width', 'name', 'type', 'conc', 'amount'].includes(compact)
}

export interface HeaderColumn extends HeaderName {
  index: number
  start: number
  end: number
}

/** Greedy longest-name merge of whitespace tokens ("Ret. Time [min]" is three tokens). */
export function mergeHeaderTokens(cells: Cell[]): Cell[] {
  const merged: Cell[] = []
  for (let i = 0; i < cells.length;) {
    let taken = 1
    for (let j = Math.min(cells.length, i + 4); j > i + 1; j--) {
      const text = cells.slice(i, j).map(c => c.text).join(' ')
      if (classifyHeader(text).kind) { taken = j - i; break }
    }
    const group = cells.slice(i, i + taken)
    merged.push({ text: group.map(c => c.text).join(' '), start: group[0]!.start, end: group[group.length - 1]!.end })
    i += taken
  }
  // A lone unit token ("[min]") belongs to the name before it.
  const out: Cell[] = []
  for (const c of merged) {
    const prev = out[out.length - 1]
    if (prev && /^[[(][^\])]*[\])]$/.test(c.text)) out[out.length - 1] = { text: `${prev.text} ${c.text}`, start: prev.start, end: c.end }
    else out.push(c)
  }
  return out
}

const NUMERIC = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/

export function cleanNumberText(raw: string): string {
  // U+2212 is the typographic minus some reports print.
  return raw.trim().replace(/^"(.*)"$/, '$1').replace(/\u2212/g, '-').replace(/(\d)[\s\u00a0\u202f\u2009'](?=\d)/g, '$1').replace(/\s*%$/, '').trim()
}

type Style = 'comma' | 'dot'

function countOf(text: string, mark: string): number {
  let n = 0
  for (let i = text.indexOf(mark); i >= 0; i = text.indexOf(mark, i + 1)) n++
  return n
}

/** Cells read per column to decide its decimal mark; a contradicting cell further down is still refused by parseNumber. */
const STYLE_SAMPLE = 400
/** true: decimal comma; false: decimal point; null: the column mixes both, so any mark is refused. */
export type DecimalMark = boolean | null

/**
 * Which mark a cell uses as its decimal separator. `sure` is false when one separator followed
 * by exactly three digits could be either ("2,498", "1.234"): the column or the file decides.
 */
function cellStyle(raw: string): { style: Style, sure: boolean } | null {
  const s = cleanNumberText(raw).replace(/^[+-]/, '').replace(/[eE][+-]?\d+$/, '')
  const commas = countOf(s, ',')
  const dots = countOf(s, '.')
  if (commas && dots) return { style: s.lastIndexOf(',') > s.lastIndexOf('.') ? 'comma' : 'dot', sure: true }
  const mark = commas ? ',' : dots ? '.' : null
  if (!mark) return null
  const count = commas || dots
  const style: Style = mark === ',' ? 'comma' : 'dot'
  const other: Style = mark === ',' ? 'dot' : 'comma'
  // Two or more marks can only be thousands groups ("1,234,567"), so the other mark is the decimal.
  if (count > 1) return { style: other, sure: true }
  const [whole, fraction] = s.split(mark) as [string, string]
  const couldBeThousands = /^[1-9]\d{0,2}$/.test(whole) && /^\d{3}$/.test(fraction)
  return { style, sure: !couldBeThousands }
}

/**
 * One decimal mark per column, from the column's own unambiguous cells, else the file's,
 * else the delimiter's custom (semicolon, tab and space files come from decimal-comma locales;
 * in comma-delimited files a comma inside a quoted number groups thousands).
 */
export function decimalCommaColumns(columns: string[][], delimiter: Delimiter): DecimalMark[] {
  const tally = columns.map((cells) => {
    const t = { comma: 0, dot: 0, unsureComma: 0, unsureDot: 0 }
    for (const c of cells.length > STYLE_SAMPLE ? cells.slice(0, STYLE_SAMPLE) : cells) {
      const st = cellStyle(c)
      if (!st) continue
      if (st.sure) t[st.style]++
      else if (st.style === 'comma') t.unsureComma++
      else t.unsureDot++
    }
    return t
  })
  const fileComma = tally.reduce((n, t) => n + t.comma, 0)
  const fileDot = tally.reduce((n, t) => n + t.dot, 0)
  return tally.map((t) => {
    if (t.comma !== t.dot) return t.comma > t.dot
    // "2,514" beside "3.087" with nothing to tell which is the decimal: refuse, never guess.
    if (t.comma === 0 && t.unsureComma && t.unsureDot) return null
    if (fileComma !== fileDot) return fileComma > fileDot
    if (t.unsureComma && !t.unsureDot) return delimiter !== ','
    return false
  })
}

const GROUPED = { comma: /^[+-]?\d{1,3}(\.\d{3})+(,\d*)?([eE][+-]?\d+)?$/, dot: /^[+-]?\d{1,3}(,\d{3})+(\.\d*)?([eE][+-]?\d+)?$/ }

/**
 * A number, NaN when the cell is not a finite number in the column's style (a decimal point in
 * a decimal-comma column is refused, not guessed), null when it is empty.
 */
export function parseNumber(raw: string, decimalComma: DecimalMark): number | null {
  let s = cleanNumberText(raw)
  if (s === '') return null
  if (decimalComma === null) {
    if (/[.,]/.test(s)) return Number.NaN
  } else if (decimalComma) {
    if (s.includes('.')) s = GROUPED.comma.test(s) ? s.replace(/\./g, '') : 'x'
    s = s.replace(',', '.')
  } else if (s.includes(',')) {
    s = GROUPED.dot.test(s) ? s.replace(/,/g, '') : 'x'
  }
  if (!NUMERIC.test(s)) return Number.NaN
  const value = Number(s)
  return Number.isFinite(value) ? value : Number.NaN
}

/** Why a numeric-looking cell was refused, for the row's message; '' when nothing specific. */
export function separatorHint(raw: string, decimalComma: DecimalMark): string {
  const s = cleanNumberText(raw)
  if (!looksNumeric(s)) return ''
  if (NUMERIC.test(s.replace(/,/g, '')) && !Number.isFinite(Number(s.replace(/,/g, '')))) return ' (it is too large to be a number)'
  if (decimalComma === null) return ' (the column mixes decimal commas and points, so it cannot be read safely: export it with one decimal mark)'
  return decimalComma
    ? ' (this column uses decimal commas elsewhere, so a point here is ambiguous)'
    : ' (this column uses decimal points elsewhere, so a comma here is ambiguous)'
}

export function looksNumeric(raw: string): boolean {
  const s = cleanNumberText(raw)
  return s !== '' && /^[+-]?[\d.,]*\d[\d.,]*([eE][+-]?\d+)?$/.test(s)
}

/**
 * Maps the cells of an aligned-text row onto header columns by character position, for
 * reports that leave a column blank in some rows. Returns null when two cells land in one column.
 */
export function alignCells(cells: Cell[], columns: { start: number, end: number }[]): (string | undefined)[] | null {
  const out: (string | undefined)[] = Array.from({ length: columns.length })
  for (const cell of cells) {
    let best = -1
    let bestScore = -Infinity
    columns.forEach((col, i) => {
      const overlap = Math.min(cell.end, col.end) - Math.max(cell.start, col.start)
      const score = overlap > 0 ? overlap : -Math.min(Math.abs(cell.end - col.end), Math.abs(cell.start - col.start))
      if (score > bestScore) { bestScore = score; best = i }
    })
    if (out[best] !== undefined) return null
    out[best] = cell.text
  }
  return out
}

export const SEPARATOR_LINE = /^[\s\-=|+_*~.]+$/
/** A cell of a units row under the header: "min", "[pA*s]", "(mV.s)", "mAU*min", "%", "#". */
export function isUnitCell(raw: string): boolean {
  const s = raw.trim().replace(/^[[(](.*)[\])]$/, '$1').trim()
  if (s === '' || s === '%' || s === '#') return true
  return s.length <= 16 && /^[a-zµμ°·*/.^\-\s0-9]+$/i.test(s) && /[a-zµμ]/i.test(s) && !looksNumeric(s)
}
