// Text-level helpers for instrument exports: lines, delimiters, cells, aligned columns, units
// rows and report furniture. Shared by the peak-table and trace parsers.

import { classifyHeader, isFillerWord } from './header-names'
import { looksNumeric } from './number-text'
import { fastPaths } from './plain-number'

export type Delimiter = ',' | ';' | '\t' | '|' | 'whitespace'

export interface Cell {
  text: string
  start: number
  end: number
}

/** Lines without BOM and line-ending noise; index i is file line i + 1. */
export function splitLines(text: string): string[] {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text
  // Splitting on one character is several times quicker than on the pattern, and the same without a CR.
  return body.includes('\r') ? body.split(/\r\n|\r|\n/) : body.split('\n')
}

/** The text is more than maxBytes in UTF-8. A UTF-16 unit is at most 3 bytes, so a short text is not counted. */
export function mayExceed(text: string, maxBytes: number): boolean {
  if (text.length > maxBytes) return true
  return text.length * 3 > maxBytes && utf8Length(text) > maxBytes
}

export function utf8Length(text: string): number {
  let bytes = 0
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i)
    if (c < 0x80) bytes += 1
    else if (c < 0x800) bytes += 2
    else if (c >= 0xd800 && c < 0xdc00) { bytes += 4; i++ } else bytes += 3
  }
  return bytes
}

/** Splits one line; cells may be quoted as in RFC 4180 ("a ""b""", doubled quotes inside). */
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
  return splitQuoted(line, delimiter)
}

const mayBeSpace = (c: number) => c <= 32 || c >= 0x80

/** The cells' texts only (splitCells without positions): what the readers of data rows need. */
export function splitTexts(line: string, delimiter: Delimiter): string[] {
  if (delimiter === 'whitespace' || line.includes('"') || !fastPaths.enabled) return splitCells(line, delimiter).map((c) => c.text)
  const texts = line.split(delimiter)
  for (let k = 0; k < texts.length; k++) {
    const text = texts[k]!
    // Trimming only when an end may be white space (ASCII space and controls, or any non-ASCII) saves a string per cell.
    if (text !== '' && (mayBeSpace(text.charCodeAt(0)) || mayBeSpace(text.charCodeAt(text.length - 1)))) texts[k] = text.trim()
  }
  return texts
}

// Hand-written rather than papaparse: a parser set up per line costs more than the whole line's work.
function splitQuoted(line: string, delimiter: string): Cell[] {
  const cells: Cell[] = []
  let i = 0
  while (i <= line.length) {
    const start = i
    while (line[i] === ' ' || (line[i] === '\t' && delimiter !== '\t')) i++
    let text = ''
    if (line[i] === '"') {
      i++
      for (;;) {
        const close = line.indexOf('"', i)
        if (close < 0) { text += line.slice(i); i = line.length; break }
        text += line.slice(i, close)
        i = close + 1
        if (line[i] !== '"') break
        text += '"'
        i++
      }
    }
    const next = line.indexOf(delimiter, i)
    const end = next < 0 ? line.length : next
    text += line.slice(i, end)
    cells.push({ text: text.trim(), start, end })
    i = end + 1
  }
  return cells
}

/** Aligned text reports separate columns by runs of spaces; header names may hold single spaces. */
export function splitWideGaps(line: string): Cell[] {
  const cells: Cell[] = []
  const re = /\S+(?: \S+)*/g
  let m: RegExpExecArray | null
  while ((m = re.exec(line))) cells.push({ text: m[0], start: m.index, end: m.index + m[0].length })
  return cells
}

/** Greedy longest-name merge of whitespace tokens ("Ret. Time [min]" is three tokens). */
export function mergeHeaderTokens(cells: Cell[]): Cell[] {
  const merged: Cell[] = []
  for (let i = 0; i < cells.length;) {
    let taken = 1
    // In a single-spaced report header a leading "Peak" is the peak-number column, not part of "Peak RetTime".
    for (let j = Math.min(cells.length, i + 4); j > i + 1 && !isFillerWord(cells[i]!.text); j--) {
      const text = cells.slice(i, j).map((c) => c.text).join(' ')
      if (classifyHeader(text).kind) { taken = j - i; break }
    }
    const group = cells.slice(i, i + taken)
    merged.push({ text: group.map((c) => c.text).join(' '), start: group[0]!.start, end: group[group.length - 1]!.end })
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

/**
 * Maps the cells of an aligned-text row onto header columns by character position, for
 * reports that leave a column blank in some rows. Words that land in one column join ("chloro
 * butane"); returns null when a number shares its column with anything else.
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
    // A word under no header belongs to the text column it trails ("butane A" under "Name").
    if (bestScore <= 0 && !looksNumeric(cell.text)) {
      const before = columns.findLastIndex((col) => col.start <= cell.start)
      if (before >= 0) best = before
    }
    const taken = out[best]
    if (taken !== undefined && (looksNumeric(taken) || looksNumeric(cell.text))) return null
    out[best] = taken === undefined ? cell.text : `${taken} ${cell.text}`
  }
  return out
}

export const SEPARATOR_LINE = /^[\s\-=|+_*~.]+$/
/** A cell of a units row under the header: "min", "[pA*s]", "(mV.s)", "mAU*min", "µV·s", "mm:ss", "%", "#". */
export function isUnitCell(raw: string): boolean {
  const s = raw.trim().replace(/^[[(](.*)[\])]$/, '$1').trim()
  if (s === '' || s === '%' || s === '#') return true
  return s.length <= 16 && /^[a-zµμ°·*/.:^\-\s0-9]+$/i.test(s) && /[a-zµμ]/i.test(s) && !looksNumeric(s)
}

// Report furniture: lines printed around a table that are neither peaks nor header, in the
// languages of the header names. Matched on the line stripped of decoration ("*** … ***").
const END_MARK = /^(end|end of (the )?(report|table|results|data|listing|file)|report end|end report|fin( du| de| del)? (rapport|informe|relatorio|relat[oó]rio)|ende( des)? (berichts|reports)|berichtsende|fine( del)? rapporto|einde( van het)? rapport|koniec raportu)$/i
const PAGE_MARK = /^(page|seite|p[aá]gina|strona|blz|pag)\.?\s*\d+(\s*(of|von|de|di|sur|z|van|\/)\s*\d+)?$/i
const PRINT_MARK = /^(printed|print (date|time)|report (printed|generated|created|date)|generated|created|signed|signature|analy[sz]t|operator|reviewed|approved|checked|verified|gedruckt|druckdatum|unterschrift|gepr[uü]ft|imprim[eé]|impreso|impresso|stampato|afgedrukt|wydrukowano|podpis|firma|assinatura|handtekening)\b/i
/** "Number of peaks: 4", "Method = CHLOR-A": a label and a value, never a peak row. */
const LABEL_LINE = /^\p{L}[\p{L}\p{M} .'()/#-]{0,40}?\s*[:=]/u
const DECORATION = /^[\s*=\-#~_<>[\]|+.:]+|[\s*=\-#~_<>[\]|+.:]+$/g

export type Furniture = 'page' | 'end' | 'print' | 'label'

/** What kind of report furniture a line is, or null when it may be part of the table. */
export function furnitureOf(line: string): Furniture | null {
  if (line.includes('\f')) return 'page'
  // Every mark and label starts with a word: rows of bare numbers skip the patterns.
  if (!/\p{L}/u.test(line)) return null
  // Cells of a delimited footer ("Page,1,of,1") read as one line.
  const core = line.replace(/["\t,;|]+/g, ' ').replace(DECORATION, '').replace(/\s+/g, ' ')
  if (core === '') return null
  if (END_MARK.test(core)) return 'end'
  if (PAGE_MARK.test(core)) return 'page'
  if (PRINT_MARK.test(core)) return 'print'
  if (LABEL_LINE.test(line.trim())) return 'label'
  return null
}
