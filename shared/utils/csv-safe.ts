// CSV for spreadsheets, safe to open. OWASP "CSV Injection" guidance: a text cell that begins
// with =, +, -, @, tab, carriage return or line feed can be read as a formula, so it is prefixed
// with a single quote; numbers stay numbers (a spreadsheet must be able to sum them).
import Papa from 'papaparse'

const FORMULA_START = /^[=+\-@\t\r\n]/

export type CsvCell = string | number | boolean | null | undefined

/** One cell made safe: strings that could start a formula get a leading apostrophe. */
export function neutraliseCell(value: CsvCell): string | number | boolean | null {
  if (value === null || value === undefined) return null
  if (typeof value === 'number') return Number.isFinite(value) ? value : null
  if (typeof value === 'boolean') return value
  return FORMULA_START.test(value) ? `'${value}` : value
}

/** Rows of cells to CSV text (CRLF line ends, every text cell quoted, a BOM for spreadsheet apps). */
export function toSafeCsv(header: string[], rows: CsvCell[][]): string {
  const data = [header.map(neutraliseCell), ...rows.map((row) => row.map(neutraliseCell))]
  const body = Papa.unparse(data as unknown[][], {
    newline: '\r\n',
    quotes: (value: unknown) => typeof value === 'string',
    escapeFormulae: false,
  })
  return `\uFEFF${body}\r\n`
}
