import { describe, expect, it } from 'vitest'
import ExcelJS from 'exceljs'
import { strToU8, zipSync } from 'fflate'
import { MAX_SHEET_XML_BYTES, readFirstSheetText, sheetExtent, sheetNumberText, sheetRowsToText } from '../../shared/utils/lib/spreadsheet'
import { readUploadContent, UploadFormatError, XLSX_MEDIA_TYPE } from '../../shared/utils/lib/upload-content'
import { analyzeSubstrate } from '../../shared/utils/halogenation'
import { evaluateRun } from '../../shared/utils/submission'

// .xlsx peak tables. Fixtures are written with exceljs, a different library from the reader
// (read-excel-file), so the test does not check a format against itself. Mole % is checked
// against the arithmetic on the numbers written: product area / sum of product areas × 100,
// with response factors of 1 (isomeric chloroalkanes on an FID: effective-carbon-number concept).

const substrate = analyzeSubstrate('CC(C)C(C)C') // 2,3-dimethylbutane
const tertiary = substrate.products.find((p) => p.carbonClass === 'tertiary')!
const primary = substrate.products.find((p) => p.carbonClass === 'primary')!
// Invented windows, as the demo library's.
const windows = [
  { productSmiles: tertiary.smiles, rtMin: 3.0, rtMax: 3.25, responseFactor: 1 },
  { productSmiles: primary.smiles, rtMin: 3.6, rtMax: 3.85, responseFactor: 1 },
]
const chemistry = {
  products: substrate.products,
  windows,
  solvent: { rtMin: 1.2, rtMax: 1.6 },
  startingMaterial: { rtMin: 2.1, rtMax: 2.45 },
  predicted: [{ smiles: tertiary.smiles, percent: 45.5 }, { smiles: primary.smiles, percent: 54.5 }],
  literature: { secondaryToPrimary: null, tertiaryToPrimary: 5 },
}

const PEAKS = [
  { rt: 1.402, area: 905123.4 }, // solvent
  { rt: 2.287, area: 301234.5 }, // unreacted substrate
  { rt: 3.118, area: 41234.5 }, // tertiary chloride
  { rt: 3.712, area: 52345.25 }, // primary chloride
]
const productArea = PEAKS[2]!.area + PEAKS[3]!.area
const expected = { [tertiary.smiles]: (100 * PEAKS[2]!.area) / productArea, [primary.smiles]: (100 * PEAKS[3]!.area) / productArea }

/**
 * An integration report as a sheet: title and sample block, header on row 4, units on row 5,
 * peaks on rows 6-9, totals on 10, a footer on 12.
 */
async function report(asText: boolean, override: (ws: ExcelJS.Worksheet) => void = () => {}): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook()
  const ws = wb.addWorksheet('Report')
  const value = (n: number) => (asText ? String(n) : n)
  const total = PEAKS.reduce((s, p) => s + p.area, 0)
  ws.getRow(1).values = ['Integration report']
  ws.getRow(2).values = ['Sample:', 'run 7 (Lösung, 40 °C)']
  ws.getRow(4).values = ['Peak', 'RT', 'Area', 'Area %']
  ws.getRow(5).values = ['', 'min', 'pA*s', '%']
  PEAKS.forEach((p, i) => { ws.getRow(6 + i).values = [i + 1, value(p.rt), value(p.area), value(+(100 * p.area / total).toFixed(3))] })
  ws.getRow(10).values = ['Total', null, value(+total.toFixed(2)), value(100)]
  ws.getRow(12).values = ['Printed by the integration software\tpage 1']
  wb.addWorksheet('Method').getRow(1).values = ['Oven', '40 C']
  override(ws)
  return new Uint8Array(await wb.xlsx.writeBuffer())
}

async function sheetText(bytes: Uint8Array) {
  const content = await readUploadContent(bytes)
  expect(content.format).toBe('xlsx')
  expect(content.mediaType).toBe(XLSX_MEDIA_TYPE)
  if (content.source.kind !== 'text') throw new Error('expected text')
  return content.source
}

describe('an .xlsx peak table', () => {
  it.each([['numbers stored as numbers', false], ['numbers stored as text', true]])('with %s: header block, units and totals rows are read as in CSV, and the mole % is the arithmetic of the areas', async (_what, asText) => {
    const source = await sheetText(await report(asText))
    const lines = source.text.split('\n')
    expect(lines[3]).toBe('Peak\tRT\tArea\tArea %')
    expect(lines[2]).toBe('') // blank sheet row 3 stays, so line n is sheet row n
    expect(lines[11]).toBe('Printed by the integration software page 1') // a tab inside a cell became a space
    expect(source.warnings).toEqual(['The workbook has 2 sheets; only the first was read.'])
    const run = evaluateRun({ source, ...chemistry })
    expect(run.kind).toBe('peak-table')
    expect(run.peaks.map((p) => [p.retentionTime, p.area, p.row])).toEqual(PEAKS.map((p, i) => [p.rt, p.area, 6 + i]))
    for (const m of run.molePercents) expect(m.percent).toBeCloseTo(expected[m.smiles]!, 9)
    expect(run.warnings.join(' ')).toMatch(/Row 10 .*totals row/)
  })

  it('names the sheet row of a cell that is not a number', async () => {
    const bytes = await report(false, (ws) => { ws.getCell('C8').value = 'n/a' })
    try {
      evaluateRun({ source: await sheetText(bytes), ...chemistry })
      expect.unreachable()
    } catch (error) {
      expect((error as { rows: Array<{ row: number, message: string }> }).rows[0]).toEqual(expect.objectContaining({ row: 8, message: expect.stringMatching(/^Row 8: the area "n\/a"/) }))
    }
  })
})

describe('sheet cells as text', () => {
  it('writes numbers with a plain point, never as an ambiguous "d.ddd"', () => {
    expect(sheetNumberText(3.118)).toBe('3.1180')
    expect(sheetNumberText(-12.345)).toBe('-12.3450')
    expect(sheetNumberText(1234.5)).toBe('1234.5')
    expect(sheetNumberText(0.123)).toBe('0.123')
    expect(sheetNumberText(12345678)).toBe('12345678')
    expect(sheetNumberText(1.5e-7)).toBe('1.5e-7')
    expect(sheetNumberText(2.345e-7)).toBe('2.3450e-7')
  })

  it('keeps blank rows, drops trailing empty cells, writes times of day as minutes:seconds', () => {
    const time = new Date(Date.UTC(1899, 11, 30, 0, 5, 30)) // Excel's 0.003819 days, formatted mm:ss
    const text = sheetRowsToText([['RT', 'Area', null], [], [time, 12, ''], [true, 'a\nb', undefined]])
    expect(text).toBe('RT\tArea\n\n5:30\t12\nTRUE\ta b\n')
  })

  it('measures the rows and columns a sheet makes the reader build', () => {
    expect(sheetExtent('<row r="3"><c r="B3"/><c r="AA3"><v>1</v></c></row><row><c/><c/></row>')).toEqual({ rows: 4, columns: 27 })
    expect(sheetExtent('<x:row r="2"><x:c r="C2"/></x:row><cols><col min="1"/></cols>')).toEqual({ rows: 2, columns: 3 })
  })
})

/** A workbook of the minimum parts, for files no spreadsheet program would write. */
function minimalWorkbook(sheetXml: string, level: 0 | 9 = 9) {
  return zipSync({
    '[Content_Types].xml': strToU8('<?xml version="1.0"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/></Types>'),
    '_rels/.rels': strToU8('<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/></Relationships>'),
    'xl/workbook.xml': strToU8('<?xml version="1.0"?><workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"><sheets><sheet name="S" sheetId="1" r:id="rId1"/></sheets></workbook>'),
    'xl/_rels/workbook.xml.rels': strToU8('<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet1.xml"/></Relationships>'),
    'xl/worksheets/sheet1.xml': strToU8(`<?xml version="1.0"?><worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>${sheetXml}</sheetData></worksheet>`),
  }, { level })
}

async function refusal(bytes: Uint8Array): Promise<UploadFormatError> {
  try {
    await readUploadContent(bytes)
  } catch (error) {
    if (error instanceof UploadFormatError) return error
    throw error
  }
  throw new Error('the file was read')
}

describe('what is refused', () => {
  it('reads the minimal workbook the guards below are built on', async () => {
    const bytes = minimalWorkbook('<row r="1"><c r="A1" t="inlineStr"><is><t>RT</t></is></c><c r="B1"><v>2.5</v></c></row>')
    expect(await readFirstSheetText(bytes)).toEqual({ text: 'RT\t2.5\n', warnings: [] })
  })

  it('a workbook that unpacks to more than the limit (a zip bomb), before inflating it', async () => {
    const bytes = minimalWorkbook(`<row r="1"><c r="A1"><v>1</v></c></row>${' '.repeat(MAX_SHEET_XML_BYTES)}`)
    expect(bytes.length).toBeLessThan(100_000)
    expect(await refusal(bytes)).toMatchObject({ status: 422, message: expect.stringMatching(/too large/) })
  })

  it('a sheet whose cells reach far right or far down (rows padded to the widest), before reading it', async () => {
    const wide = Array.from({ length: 200 }, (_, i) => `<row r="${i + 1}"><c r="XFD${i + 1}"><v>1</v></c></row>`).join('')
    expect(await refusal(minimalWorkbook(wide))).toMatchObject({ status: 422, message: expect.stringMatching(/too large/) })
    expect(await refusal(minimalWorkbook('<row r="900000000"><c r="A900000000"><v>1</v></c></row>'))).toMatchObject({ status: 422 })
  })

  it('a workbook with no sheets (422), a zip that is no workbook (415), a damaged workbook (422)', async () => {
    const empty = new Uint8Array(await new ExcelJS.Workbook().xlsx.writeBuffer())
    expect(await refusal(empty)).toMatchObject({ status: 422, message: 'the workbook has no sheets' })
    expect(await refusal(zipSync({ 'notes.txt': strToU8('RT,Area') }))).toMatchObject({ status: 415, message: expect.stringMatching(/not an Excel workbook/) })
    const good = await report(false)
    expect(await refusal(good.subarray(0, good.length - 200))).toMatchObject({ status: 422, message: expect.stringMatching(/damaged/) })
    const ods = zipSync({ 'mimetype': strToU8('application/vnd.oasis.opendocument.spreadsheet'), 'content.xml': strToU8('<x/>') })
    expect(await refusal(ods)).toMatchObject({ status: 415, message: expect.stringMatching(/OpenDocument/) })
  })

  // Minimal stand-ins: the OLE2 compound-file signature (MS-CFB) and a directory name in
  // UTF-16LE, which is all the check reads. An encrypted .xlsx keeps an "EncryptedPackage"
  // stream (MS-OFFCRYPTO); an old .xls keeps a "Workbook" stream.
  const ole2 = (stream: string) => Uint8Array.from([
    0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1,
    ...new Array(504).fill(0),
    ...Array.from(stream, (c) => [c.charCodeAt(0), 0]).flat(),
  ])

  it('an old binary .xls (415) and a password-protected workbook (422), each with its own sentence', async () => {
    expect(await refusal(ole2('Workbook'))).toMatchObject({ status: 415, message: expect.stringMatching(/old binary Excel file \(\.xls\)/) })
    expect(await refusal(ole2('EncryptedPackage'))).toMatchObject({ status: 422, message: expect.stringMatching(/protected with a password/) })
  })
})
