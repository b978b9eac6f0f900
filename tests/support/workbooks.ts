import ExcelJS from 'exceljs'

// .xlsx peak tables for upload tests, written with exceljs (not the reader the server uses):
// a title and sample block, a blank row, the header, a units row, one row per peak, a totals row.

/** An area given as text is written as that text (a cell the parser must refuse). */
export interface WorkbookPeak { retentionTime: number, area: number | string }

/** The sheet rows are: 1 title, 2 sample, 3 blank, 4 header, 5 units, 6… peaks, then totals. */
export async function peakTableWorkbook(
  peaks: WorkbookPeak[],
  options: { numbersAsText?: boolean, sample?: string } = {},
): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook()
  const ws = wb.addWorksheet('Peak table')
  const cell = (n: number) => (options.numbersAsText ? String(n) : n)
  const total = peaks.reduce((s, p) => s + (typeof p.area === 'number' ? p.area : 0), 0)
  ws.addRow(['Integration report'])
  ws.addRow(['Sample:', options.sample ?? 'simulated run'])
  ws.addRow([])
  ws.addRow(['Peak', 'RT', 'Area', 'Area %'])
  ws.addRow(['', 'min', 'pA*s', '%'])
  peaks.forEach((p, i) => ws.addRow(typeof p.area === 'number'
    ? [i + 1, cell(+p.retentionTime.toFixed(4)), cell(+p.area.toFixed(2)), cell(+(100 * p.area / total).toFixed(3))]
    : [i + 1, cell(+p.retentionTime.toFixed(4)), p.area]))
  ws.addRow(['Total', null, cell(+total.toFixed(2)), cell(100)])
  return new Uint8Array(await wb.xlsx.writeBuffer())
}
