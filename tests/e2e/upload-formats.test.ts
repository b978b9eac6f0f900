import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { strToU8, zipSync } from 'fflate'
import type { Client } from '../support/http'
import { signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { gcTable, makeGcPractical, sha256, uploadGc, type GcPractical } from '../support/gc'
import { utf16Bytes } from '../support/encodings'
import { peakTableWorkbook } from '../support/workbooks'
import { andiTrace } from '../support/andi-fixtures'
import ExcelJS from 'exceljs'
import { simulateTrace } from '../../shared/utils/simulation'
import { fixture as rosterFixture, makeCourse, upload as rosterUpload } from './fixtures/rosters/course'

// Every common GC export through the real server, judged by its bytes: UTF-16 "Unicode text",
// .xlsx peak tables and ANDI/AIA netCDF chromatograms, for the submission routes (contract and
// preview), the standard-run upload and the roster import; the stored original and its download.
//
// Check values: runs are simulated from the method's own prediction (Cl2 and light, 1 : 3.8 : 5.0
// per H at 25 °C, NCERT Chemistry class XI worked example), as in submissions-upload.test.ts.
// For netCDF traces the peaks are Gaussians, whose areas are known exactly (the normal density
// integrates to 1): the expected mole % is their arithmetic.

let gc: GcPractical
let student: Client

beforeAll(async () => {
  gc = await makeGcPractical({ students: 8 })
  student = await gc.signIn(gc.students[0]!)
})
afterAll(async () => {
  await gc?.cleanup()
  await closeTestDb()
})

const percentOf = (list: Array<{ smiles: string, percent: number }>, smiles: string) => list.find((m) => m.smiles === smiles)!.percent
const storedFile = (submissionId: number) => testDb().selectFrom('submissions').innerJoin('files', 'files.id', 'submissions.fileId')
  .select(['files.content', 'files.mediaType', 'files.sha256', 'files.originalName']).where('submissions.id', '=', submissionId).executeTakeFirstOrThrow()
const rowCount = async () => Number((await testDb().selectFrom('submissions').select((eb) => eb.fn.countAll().as('n')).where('practicalId', '=', gc.practicalId).executeTakeFirstOrThrow()).n)

/** The original file as the browser downloads it: status, headers and the exact bytes. */
async function download(client: Client, submissionId: number) {
  const response = await fetch(new URL(`/submissions/${submissionId}/file`, client.baseUrl), { headers: { cookie: client.cookieHeader } })
  return { status: response.status, type: response.headers.get('content-type'), disposition: response.headers.get('content-disposition'), bytes: new Uint8Array(await response.arrayBuffer()) }
}

describe('UTF-16 "Unicode text" exports', () => {
  it('a tab-separated UTF-16LE file with a BOM is read like its UTF-8 original (201), stored and served byte for byte', async () => {
    const table = gcTable(gc, { seed: 51, style: 'tab' })
    const bytes = utf16Bytes(table.text, 'le', true)
    const reply = await uploadGc(student, gc.practicalId, bytes, { name: 'unicode-export.txt' })
    expect(reply.status, JSON.stringify(reply.body)).toBe(201)
    expect(reply.body.kind).toBe('peak-table')
    for (const t of gc.truth) expect(Math.abs(percentOf(reply.body.result.molePercents, t.smiles) - t.percent)).toBeLessThan(1)
    const stored = await storedFile(reply.body.id)
    expect(stored).toMatchObject({ sha256: sha256(bytes), mediaType: 'text/csv; profile=peak-table', originalName: 'unicode-export.txt' })
    const got = await download(student, reply.body.id)
    expect(got.status).toBe(200)
    expect(got.type).toMatch(/^text\/plain/)
    expect(Buffer.compare(Buffer.from(got.bytes), Buffer.from(bytes))).toBe(0)
  })

  it('UTF-16BE, with or without a BOM, previews exactly as the UTF-8 file does', async () => {
    const text = gcTable(gc, { seed: 52, style: 'semicolon-decimal-comma' }).text
    const utf8 = await uploadGc(student, gc.practicalId, text, { preview: true })
    expect(utf8.status).toBe(200)
    for (const [endian, bom] of [['be', true], ['be', false], ['le', false]] as const) {
      const other = await uploadGc(student, gc.practicalId, utf16Bytes(text, endian, bom), { preview: true, name: 'export.csv' })
      expect(other.status, `${endian} ${bom}`).toBe(200)
      expect(other.body.molePercents).toEqual(utf8.body.molePercents)
      expect(other.body.peaks).toEqual(utf8.body.peaks)
    }
  })
})

describe('.xlsx peak tables', () => {
  it('are read from the first sheet (header block, units, totals), mole % within 1 point, kept as the workbook', async () => {
    const table = gcTable(gc, { seed: 53 })
    const bytes = await peakTableWorkbook(table.peaks)
    const reply = await uploadGc(student, gc.practicalId, bytes, { name: 'peak-table.xlsx' })
    expect(reply.status, JSON.stringify(reply.body)).toBe(201)
    expect(reply.body.kind).toBe('peak-table')
    for (const t of gc.truth) expect(Math.abs(percentOf(reply.body.result.molePercents, t.smiles) - t.percent)).toBeLessThan(1)
    const stored = await storedFile(reply.body.id)
    expect(stored.mediaType).toBe('application/vnd.openxmlformats-officedocument.spreadsheetml.sheet')
    const got = await download(student, reply.body.id)
    expect(got.type).toBe('application/vnd.openxmlformats-officedocument.spreadsheetml.sheet')
    expect(got.disposition).toMatch(/peak-table\.xlsx"$/)
    expect(sha256(got.bytes)).toBe(sha256(bytes))
  })

  it('numbers stored as text give the same preview as numbers stored as numbers', async () => {
    const peaks = gcTable(gc, { seed: 54 }).peaks
    const asNumbers = await uploadGc(student, gc.practicalId, await peakTableWorkbook(peaks), { preview: true, name: 'a.xlsx' })
    const asText = await uploadGc(student, gc.practicalId, await peakTableWorkbook(peaks, { numbersAsText: true }), { preview: true, name: 'b.xlsx' })
    expect(asNumbers.status).toBe(200)
    expect(asText.body.molePercents).toEqual(asNumbers.body.molePercents)
    // Rows 1-5 are the report's head: the first peak is on sheet row 6.
    // `row` is sent beside the declared peak view, for the page's row references.
    expect(asNumbers.body.peaks[0]).toMatchObject({ row: 6 })
  })

  it('a cell that is not a number is refused with its sheet row (422, data.rows)', async () => {
    const peaks = gcTable(gc, { seed: 55 }).peaks
    const bytes = await peakTableWorkbook(peaks.map((p, i) => (i === 2 ? { ...p, area: 'n/a' } : p)))
    const reply = await uploadGc(student, gc.practicalId, bytes, { name: 'bad.xlsx' })
    expect(reply.status).toBe(422)
    expect(reply.refusal.data?.rows?.[0]).toEqual(expect.objectContaining({ row: 8, message: expect.stringMatching(/^Row 8: the area "n\/a" is not a number/) }))
  })
})

describe('a detector trace saved as .xlsx', () => {
  it('is a large sheet (its XML over half a megabyte) read as a trace and integrated', async () => {
    const peaks = gc.windows.map((w) => ({
      retentionTime: (w.rtMin + w.rtMax) / 2,
      area: percentOf(gc.truth, w.productSmiles) * 10,
      sigma: 0.02,
    }))
    const trace = simulateTrace({ seed: 6, duration: 5, points: 12_000, noise: 0.02, peaks })
    const wb = new ExcelJS.Workbook()
    const ws = wb.addWorksheet('Trace')
    ws.addRow(['Time (min)', 'Signal (pA)'])
    trace.time.forEach((t, i) => ws.addRow([+t.toFixed(5), +trace.signal[i]!.toFixed(4)]))
    const reply = await uploadGc(student, gc.practicalId, new Uint8Array(await wb.xlsx.writeBuffer()), { preview: true, name: 'trace.xlsx' })
    expect(reply.status, JSON.stringify(reply.body)).toBe(200)
    expect(reply.body.kind).toBe('trace')
    for (const t of gc.truth) expect(Math.abs(percentOf(reply.body.molePercents, t.smiles) - t.percent)).toBeLessThan(0.5)
  })
})

describe('ANDI/AIA netCDF chromatograms', () => {
  const gaussians = () => [
    { retentionTime: (gc.solvent!.rtMin + gc.solvent!.rtMax) / 2, area: 3000, sigma: 0.02 },
    ...gc.windows.map((w) => ({ retentionTime: (w.rtMin + w.rtMax) / 2, area: percentOf(gc.truth, w.productSmiles) * 10, sigma: 0.02 })),
  ]

  it('a trace is integrated here: 201, kind trace, mole % within 0.5 points of the Gaussian areas, kept as netCDF', async () => {
    const bytes = andiTrace({ peaks: gaussians(), intervalSeconds: 0.2, points: 1800, baseline: 3, noise: 0.02, seed: 4 })
    const reply = await uploadGc(student, gc.practicalId, bytes, { name: 'run.cdf' })
    expect(reply.status, JSON.stringify(reply.body)).toBe(201)
    expect(reply.body.kind).toBe('trace')
    for (const t of gc.truth) expect(Math.abs(percentOf(reply.body.result.molePercents, t.smiles) - t.percent)).toBeLessThan(0.5)
    expect((await storedFile(reply.body.id)).mediaType).toBe('application/x-netcdf')
    const got = await download(student, reply.body.id)
    expect(got.type).toBe('application/x-netcdf')
    expect(sha256(got.bytes)).toBe(sha256(bytes))
  })

  it('a stored peak table is used instead of integrating, and the preview says so', async () => {
    const stored = gaussians().map((p) => ({ retentionTimeSeconds: p.retentionTime * 60, area: p.area }))
    const reply = await uploadGc(student, gc.practicalId, andiTrace({ peaks: gaussians(), points: 1800, storedPeaks: stored }), { preview: true, name: 'run.nc' })
    expect(reply.status).toBe(200)
    expect(reply.body.kind).toBe('peak-table')
    expect(reply.body.warnings[0]).toMatch(/instrument's own peak table/)
    for (const t of gc.truth) expect(percentOf(reply.body.molePercents, t.smiles)).toBeCloseTo(t.percent, 3)
  })

  it('a truncated file is a 422 naming netCDF; nothing is stored', async () => {
    const before = await rowCount()
    const bytes = andiTrace({ peaks: gaussians(), points: 1800 })
    const reply = await uploadGc(student, gc.practicalId, bytes.subarray(0, bytes.length - 500), { name: 'cut.cdf' })
    expect(reply.status).toBe(422)
    expect(reply.refusal.statusMessage).toMatch(/^file: netCDF: .*cut short/)
    expect(await rowCount()).toBe(before)
  })
})

describe('what is refused by its bytes', () => {
  const ole2 = (stream: string) => Uint8Array.from([
    0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1,
    ...new Array(504).fill(0),
    ...Array.from(stream, (c) => [c.charCodeAt(0), 0]).flat(),
  ])

  it('old .xls (415), a password-protected workbook (422), a zip bomb (422), an image named .xlsx (415); nothing stored', async () => {
    const before = await rowCount()
    const cases: Array<[Uint8Array, string, number, RegExp]> = [
      [ole2('Workbook'), 'old.xls', 415, /\.xls/],
      [ole2('EncryptedPackage'), 'locked.xlsx', 422, /password/],
      [zipSync({ '[Content_Types].xml': strToU8('<Types/>'), 'xl/worksheets/sheet1.xml': strToU8(' '.repeat(20_000_000)) }, { level: 9 }), 'bomb.xlsx', 422, /too large/],
      [Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52]), 'picture.xlsx', 415, /binary file/],
    ]
    for (const [bytes, name, status, message] of cases) {
      const reply = await uploadGc(student, gc.practicalId, bytes, { name })
      expect(reply.status, name).toBe(status)
      expect(reply.refusal.statusMessage, name).toMatch(message)
      expect((await uploadGc(student, gc.practicalId, bytes, { name, preview: true })).status, `${name} preview`).toBe(status)
    }
    expect(await rowCount()).toBe(before)
  })
})

describe('standard runs and rosters read the same encodings and formats', () => {
  it('a standard run as .xlsx and as a netCDF peak table gives the CSV run\'s peaks', async () => {
    const instructor = await createUser('instructor')
    const client = await signedIn(instructor.email, instructor.password)
    const substrate = (await client.post('/api/substrates', { name: '1-chlorobutane, column C', smiles: 'ClCCCC', density: 0.886, boilingPointC: 78.4, source: 'CRC Handbook, from memory' })).body
    const send = (bytes: Uint8Array, name: string) => {
      const form = new FormData()
      form.append('file', new Blob([bytes as BlobPart]), name)
      return client.request(`/api/substrates/${substrate.id}/standard-runs`, { method: 'POST', body: form })
    }
    const fromCsv = await send(readFileSync(new URL('./fixtures/standard-runs/1-chlorobutane-standard.csv', import.meta.url)), 'standard.csv')
    expect(fromCsv.status).toBe(201)
    const peaks = fromCsv.body.peaks.map((p) => ({ retentionTime: p.retentionTime, area: p.area }))
    const fromXlsx = await send(await peakTableWorkbook(peaks), 'standard.xlsx')
    expect(fromXlsx.status, JSON.stringify(fromXlsx.body)).toBe(201)
    expect(fromXlsx.body.peaks.map((p) => [p.retentionTime, p.area])).toEqual(peaks.map((p) => [p.retentionTime, p.area]))
    const stored = peaks.map((p) => ({ retentionTimeSeconds: p.retentionTime * 60, area: p.area }))
    const fromCdf = await send(andiTrace({ peaks: [], points: 600, storedPeaks: stored }), 'standard.cdf')
    expect(fromCdf.status, JSON.stringify(fromCdf.body)).toBe(201)
    // netCDF stores 32-bit floats: about 7 significant digits.
    fromCdf.body.peaks.forEach((p, i) => {
      expect(p.retentionTime).toBeCloseTo(peaks[i]!.retentionTime, 4)
      expect(p.area / peaks[i]!.area).toBeCloseTo(1, 6)
    })
    const files = await testDb().selectFrom('standardRuns').innerJoin('files', 'files.id', 'standardRuns.fileId').select('files.mediaType')
      .where('standardRuns.substrateId', '=', substrate.id).orderBy('standardRuns.id').execute()
    expect(files.map((f) => f.mediaType)).toEqual(['text/plain', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', 'application/x-netcdf'])
  })

  it('a roster saved as UTF-16 previews like the UTF-8 file', async () => {
    const { course, client } = await makeCourse()
    const utf8 = rosterFixture('clean.csv')
    const text = new TextDecoder().decode(utf8)
    const a = await rosterUpload(client, `/api/courses/${course.id}/roster/preview`, utf8, {}, 'clean.csv')
    const b = await rosterUpload(client, `/api/courses/${course.id}/roster/preview`, Buffer.from(utf16Bytes(text, 'le', true)), {}, 'clean.txt')
    expect(b.status, JSON.stringify(b.body)).toBe(200)
    expect(b.body.rows).toEqual(a.body.rows)
    expect(b.body.columns).toEqual(a.body.columns)
  })
})
