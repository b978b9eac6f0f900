// Peak tables saved as .xlsx: the first sheet becomes tab-separated text for the same parser
// as CSV, one line per sheet row (blank rows kept), so header blocks, units rows, totals and
// footers are read alike and a message's row number is the sheet's row number.
//
// The sheet is read by read-excel-file (MIT; pure JavaScript on fflate and a SAX parser; Node 18+;
// no published security advisories found for it or fflate). exceljs 4.4.0 was the other choice:
// its last release is from 2023 and it pulls about 150 packages (archiver, jszip, unzipper, tmp),
// so it stays a test-only writer of fixtures here. SheetJS's npm package is frozen at a version
// with published denial-of-service and prototype-pollution advisories.
//
// A zip can unpack to far more than it weighs: the sizes its directory declares are checked
// first (fflate inflates into a buffer of exactly the declared size, so a lie cannot grow it),
// then the extent of each sheet (the reader pads every row to the widest one), before reading.
import { unzipSync } from 'fflate'
import { readSheet } from 'read-excel-file/universal'

/**
 * What the XML parts of a workbook may unpack to. A peak table of 5000 rows is under 1 MB of
 * XML; reading takes about 40 ms per MB here (2 cores), so the cap keeps a read well under half
 * a second while the server waits (measured with a 2.5 MB workbook of 60,000 random rows).
 */
export const MAX_SHEET_XML_BYTES = 8_000_000
export const MAX_SHEET_ROWS = 100_000
/** Rows × columns of a sheet as the reader builds it. */
export const MAX_SHEET_CELLS = 1_000_000
/** Characters of the text handed to the parsers. */
export const MAX_SHEET_TEXT = 8_000_000

export class SpreadsheetError extends Error {
  constructor(readonly status: 415 | 422, message: string) {
    super(message)
    this.name = 'SpreadsheetError'
  }
}

const TOO_BIG = 'the workbook is too large to be a peak table: export only the peak table (one sheet) and upload that'

interface ZipEntry { name: string, originalSize: number }

function listZip(bytes: Uint8Array): ZipEntry[] {
  const entries: ZipEntry[] = []
  try {
    // The filter sees each entry of the central directory and declines it: nothing is inflated.
    unzipSync(bytes, { filter: (f) => { entries.push({ name: f.name, originalSize: f.originalSize }); return false } })
  } catch {
    throw new SpreadsheetError(422, 'the spreadsheet is damaged (its zip structure cannot be read): save it again as .xlsx')
  }
  return entries
}

const isSheet = (name: string) => /^xl\/worksheets\/[^/]+\.xml$/i.test(name)
/** The parts read-excel-file inflates (it skips images, printer settings and other binaries). */
const isXmlPart = (name: string) => name.endsWith('.xml') || name.endsWith('.xml.rels')

function checkWorkbook(entries: ZipEntry[]): number {
  const names = new Set(entries.map((e) => e.name))
  if (names.has('xl/workbook.bin')) throw new SpreadsheetError(415, 'this is a binary Excel workbook (.xlsb): save it as .xlsx or CSV')
  if (names.has('mimetype') && names.has('content.xml')) {
    throw new SpreadsheetError(415, 'this is an OpenDocument file (.ods): save it as .xlsx or CSV')
  }
  if (!names.has('[Content_Types].xml') || ![...names].some((n) => n.startsWith('xl/'))) {
    throw new SpreadsheetError(415, 'this is a zip archive, not an Excel workbook (.xlsx): upload the peak table itself')
  }
  const sheets = entries.filter((e) => isSheet(e.name)).length
  if (sheets === 0) throw new SpreadsheetError(422, 'the workbook has no sheets')
  const unpacked = entries.filter((e) => isXmlPart(e.name)).reduce((sum, e) => sum + e.originalSize, 0)
  if (unpacked > MAX_SHEET_XML_BYTES) throw new SpreadsheetError(422, TOO_BIG)
  return sheets
}

function columnNumber(letters: string): number {
  let n = 0
  for (const ch of letters) n = n * 26 + (ch.charCodeAt(0) - 64)
  return n
}

/**
 * Rows and columns a sheet's XML makes the reader build: from the row and cell references, or
 * by counting where a writer leaves them out (as the reader does).
 */
export function sheetExtent(xml: string): { rows: number, columns: number } {
  let row = 0
  let column = 0
  let rows = 0
  let columns = 0
  for (const [, name, attrs = ''] of xml.matchAll(/<(?:[\w.-]+:)?(row|c)(?=[\s/>])([^>]*)>/g)) {
    if (name === 'row') {
      const r = /(?:^|\s)r="(\d+)"/.exec(attrs)
      row = r ? Number(r[1]) : row + 1
      column = 0
    } else {
      const ref = /(?:^|\s)r="([A-Z]+)(\d+)"/.exec(attrs)
      column = ref ? columnNumber(ref[1]!) : column + 1
      if (ref) row = Math.max(row, Number(ref[2]))
    }
    rows = Math.max(rows, row)
    columns = Math.max(columns, column)
  }
  return { rows, columns }
}

function checkSheetExtents(bytes: Uint8Array) {
  const sheets = unzipSync(bytes, { filter: (f) => isSheet(f.name) })
  const decoder = new TextDecoder('utf-8')
  for (const data of Object.values(sheets)) {
    const { rows, columns } = sheetExtent(decoder.decode(data))
    if (rows > MAX_SHEET_ROWS || rows * columns > MAX_SHEET_CELLS) throw new SpreadsheetError(422, TOO_BIG)
  }
}

export type SheetCell = string | number | boolean | Date | null | undefined

const EPOCHS = [Date.UTC(1899, 11, 30), Date.UTC(1899, 11, 31), Date.UTC(1904, 0, 1)]
const DAY = 86_400_000

/**
 * A number as the text parser reads it without doubt: a plain "." decimal, no grouping, and
 * never one to three digits, a point and exactly three digits ("2.345"), which a file that
 * uses decimal commas elsewhere would read as 2345: a trailing zero makes it "2.3450".
 */
export function sheetNumberText(value: number): string {
  return String(value).replace(/^(-?[1-9]\d{0,2}\.\d{3})(e[+-]?\d+)?$/i, '$10$2')
}

function dateText(date: Date): string {
  const ms = date.getTime()
  if (Number.isNaN(ms)) return ''
  // A time without a date (a duration such as a retention time formatted mm:ss) sits on the
  // first day of the workbook's epoch: written as minutes:seconds.
  const epoch = EPOCHS.find((e) => ms >= e && ms < e + DAY)
  if (epoch !== undefined) {
    const seconds = Math.round(ms - epoch) / 1000
    const minutes = Math.floor(seconds / 60)
    const rest = +(seconds - minutes * 60).toFixed(3)
    return `${minutes}:${rest < 10 ? '0' : ''}${rest}`
  }
  return date.toISOString().replace('T', ' ').replace(/(:00)?\.000Z$/, '')
}

function cellText(cell: SheetCell): string {
  if (cell === null || cell === undefined) return ''
  if (typeof cell === 'number') return Number.isFinite(cell) ? sheetNumberText(cell) : ''
  if (typeof cell === 'boolean') return cell ? 'TRUE' : 'FALSE'
  if (cell instanceof Date) return dateText(cell)
  return String(cell).replace(/[\t\r\n]+/g, ' ')
}

/** Sheet rows as tab-separated lines; line n is sheet row n (blank rows stay as empty lines). */
export function sheetRowsToText(rows: SheetCell[][]): string {
  const lines: string[] = []
  let length = 0
  for (const row of rows) {
    const cells = row.map(cellText)
    while (cells.length && cells[cells.length - 1] === '') cells.pop()
    const line = cells.join('\t')
    length += line.length + 1
    if (length > MAX_SHEET_TEXT) throw new SpreadsheetError(422, TOO_BIG)
    lines.push(line)
  }
  return `${lines.join('\n')}\n`
}

/**
 * A cell as read-excel-file gives it. Its types name a date cell `typeof Date` (the constructor);
 * at run time it is a Date instance, which is what SheetCell says.
 */
function sheetCell(value: unknown): SheetCell {
  if (value === null || value === undefined || value instanceof Date) return value
  if (typeof value === 'string' || typeof value === 'number' || typeof value === 'boolean') return value
  return String(value)
}

/** The first sheet of an .xlsx file as text for parsePeakTable / parseTrace, with notes for the reader. */
export async function readFirstSheetText(bytes: Uint8Array): Promise<{ text: string, warnings: string[] }> {
  const sheets = checkWorkbook(listZip(bytes))
  checkSheetExtents(bytes)
  let rows: SheetCell[][]
  try {
    const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer
    rows = (await readSheet(buffer)).map((row) => row.map(sheetCell))
  } catch (error) {
    if ((error as Error)?.name === 'SheetNotFoundError') throw new SpreadsheetError(422, 'the workbook has no sheets')
    throw new SpreadsheetError(422, 'the spreadsheet cannot be read (its sheet data is damaged): save it again as .xlsx')
  }
  const warnings = sheets > 1 ? [`The workbook has ${sheets} sheets; only the first was read.`] : []
  return { text: sheetRowsToText(rows), warnings }
}
