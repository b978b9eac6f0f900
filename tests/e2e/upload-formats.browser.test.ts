import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { expectAccessible, launchBrowser, openTab, screenshotFromTop, signInThroughPage } from '../support/browser'
import { closeTestDb, TEST_PASSWORD } from '../support/db'
import { gcTable, makeGcPractical, type GcPractical } from '../support/gc'
import { utf16Bytes } from '../support/encodings'
import { peakTableWorkbook } from '../support/workbooks'
import { andiTrace } from '../support/andi-fixtures'

// A student sends the exports a Windows GC workstation writes: a "Unicode text" (UTF-16) peak
// table, an .xlsx peak table and an ANDI/AIA netCDF trace, and reads each result in Chromium.
// The practical is a test one of its own (2,3-dimethylbutane, chlorine and light); the
// simulated runs follow the method's prediction (1 : 3.8 : 5.0 per H, NCERT class XI example).

let browser: Browser
let gc: GcPractical

beforeAll(async () => {
  browser = await launchBrowser()
  gc = await makeGcPractical({ students: 2 })
})
afterAll(async () => {
  await browser?.close()
  await gc?.cleanup()
  await closeTestDb()
})

describe('GC exports in other formats, in Chromium', () => {
  it('a student uploads a UTF-16 table, an .xlsx table and a netCDF trace, and sees each result', async () => {
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, gc.students[0]!.email, TEST_PASSWORD)
    await page.goto(`/practicals/${gc.practicalId}/results`)
    await page.getByRole('heading', { name: 'GC results', level: 1 }).waitFor()

    // The chooser offers the new formats and the hint names them.
    const input = page.getByLabel('Choose a GC file')
    const accept = (await input.getAttribute('accept')) ?? ''
    for (const ext of ['.csv', '.xlsx', '.cdf', '.nc']) expect(accept.split(',')).toContain(ext)
    await page.getByText(/an Excel \.xlsx sheet/).waitFor()
    await page.getByText(/ANDI\/AIA netCDF chromatogram \(\.cdf\)/).waitFor()

    const preview = page.locator('[data-test=gc-preview]')
    const stored = page.locator('[data-test=gc-stored]')
    const send = async (name: string, mimeType: string, bytes: Uint8Array, version: number, shot: string) => {
      await input.setInputFiles({ name, mimeType, buffer: Buffer.from(bytes) })
      await preview.getByRole('heading', { name: 'Check the result before you submit' }).waitFor()
      await preview.getByText(name).waitFor()
      await expectAccessible(page)
      await screenshotFromTop(page, shot)
      await preview.getByRole('button', { name: 'Confirm and submit' }).click()
      await stored.getByRole('heading', { name: `Submitted as version ${version}` }).waitFor()
    }

    // 1. "Unicode text": UTF-16LE with a BOM, tab-separated.
    await send('unicode-export.txt', 'text/plain', utf16Bytes(gcTable(gc, { seed: 61, style: 'tab' }).text, 'le', true), 1, 'gc-formats-utf16-preview')
    // 2. An .xlsx peak table with a header block, a units row and a totals row.
    await send('peak-table.xlsx', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', await peakTableWorkbook(gcTable(gc, { seed: 62 }).peaks), 2, 'gc-formats-xlsx-preview')
    // 3. An ANDI/AIA netCDF trace: integrated by the server.
    const gaussians = [
      { retentionTime: (gc.solvent!.rtMin + gc.solvent!.rtMax) / 2, area: 3000, sigma: 0.02 },
      ...gc.windows.map((w) => ({
        retentionTime: (w.rtMin + w.rtMax) / 2,
        area: gc.truth.find((t) => t.smiles === w.productSmiles)!.percent * 10,
        sigma: 0.02,
      })),
    ]
    await input.setInputFiles({ name: 'run.cdf', mimeType: 'application/x-netcdf', buffer: Buffer.from(andiTrace({ peaks: gaussians, points: 1800, noise: 0.02, seed: 5 })) })
    await preview.getByText('Read as a raw detector trace').waitFor()
    await preview.getByRole('cell', { name: 'solvent' }).waitFor()
    await expectAccessible(page)
    await screenshotFromTop(page, 'gc-formats-netcdf-preview')
    await preview.getByRole('button', { name: 'Confirm and submit' }).click()
    await stored.getByRole('heading', { name: 'Submitted as version 3' }).waitFor()

    // The history lists every stored version with its file (the newest shows above it until a reload).
    await page.reload()
    const history = page.locator('[data-test=gc-history]')
    await history.locator('[data-test=version-3]').getByText('run.cdf').waitFor()
    await history.locator('[data-test=version-3]').getByText(/detector trace/).waitFor()
    await history.locator('[data-test=version-2]').getByText('peak-table.xlsx').waitFor()
    await history.locator('[data-test=version-1]').getByText('unicode-export.txt').waitFor()
    await screenshotFromTop(page, 'gc-formats-history')

    // An old .xls is stopped before it is sent, with what to do instead.
    await input.setInputFiles({ name: 'old-report.xls', mimeType: 'application/vnd.ms-excel', buffer: Buffer.from([0xd0, 0xcf, 0x11, 0xe0]) })
    await page.locator('[data-test=upload-problem]').getByText(/Save it as \.xlsx or CSV/).waitFor()
    // A netCDF file cut short is refused by the server with its reason.
    const cut = andiTrace({ peaks: gaussians, points: 1800 })
    await input.setInputFiles({ name: 'cut.cdf', mimeType: 'application/x-netcdf', buffer: Buffer.from(cut.subarray(0, cut.length - 400)) })
    await page.locator('[data-test=upload-problem]').getByText(/netCDF: the file is cut short/).waitFor()
    await expectAccessible(page)
    await screenshotFromTop(page, 'gc-formats-refused')
    expect(tab.problems.filter((p) => !/status of 422/.test(p))).toEqual([])
    await tab.context.close()
  })
})
