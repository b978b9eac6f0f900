import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'
import { createUser, testDb } from '../support/db'

const STANDARD_RUN = join(import.meta.dirname, 'fixtures', 'standard-runs', '1-chlorobutane-standard.csv')

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => { await browser?.close() })

async function accessible(page: Page, name: string) {
  const violations = await seriousViolations(page)
  expect(violations, `${name}\n${describeViolations(violations)}`).toEqual([])
  // A full-page capture of a scrolled page would paint the sticky header mid-page.
  await page.evaluate(() => window.scrollTo(0, 0))
  await screenshot(page, name)
}

describe('the library in Chromium', () => {
  it('an instructor creates a substrate from SMILES and sets its windows from a standard run', async () => {
    const instructor = await createUser('instructor', { name: 'Lena Marwood' })
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, instructor.email, instructor.password)
    await page.goto('/library')
    await page.getByRole('link', { name: '1-chlorobutane', exact: true }).waitFor()
    await accessible(page, 'library-substrates')
    await page.getByRole('tab', { name: /Methods/ }).click()
    await page.getByRole('link', { name: 'Sulfuryl chloride with AIBN' }).waitFor()
    await accessible(page, 'library-methods')

    await page.getByRole('link', { name: 'New substrate' }).click()
    await page.getByLabel(/^Name/).fill('1-chlorobutane, column B')
    // No submit: the products follow the SMILES as it is typed.
    await page.getByLabel(/^SMILES/).pressSequentially('ClCCCC', { delay: 30 })
    await page.locator('[data-test="product-row"]').nth(3).waitFor()
    expect(await page.locator('[data-test="product-h"]').allTextContents()).toEqual(['3', '2', '2', '2'])
    await expect.poll(() => page.locator('[data-test="canonical-smiles"]').textContent()).toBe('CCCCCl')
    await page.getByLabel(/^Density/).fill('0.886')
    await page.getByLabel(/^Source of the physical data/).fill('CRC Handbook, from memory')
    await accessible(page, 'library-substrate-new')

    // A structure the engine refuses is explained beside the field.
    await page.getByLabel(/^SMILES/).fill('CCN')
    await expect.poll(() => page.getByLabel(/^SMILES/).getAttribute('aria-invalid')).toBe('true')
    await page.getByLabel(/^SMILES/).fill('ClCCCC')
    await page.locator('[data-test="product-row"]').nth(3).waitFor()
    await page.getByRole('button', { name: 'Add to my library' }).click()
    await page.waitForURL(/\/library\/substrates\/\d+$/)
    const id = Number(page.url().split('/').at(-1))
    await page.getByRole('heading', { name: '1-chlorobutane, column B' }).waitFor()

    await page.locator('[data-test="standard-run-file"]').setInputFiles(STANDARD_RUN)
    await page.locator('[data-test="peak-row"]').nth(5).waitFor()
    const products = await testDb().selectFrom('substrates').select('smiles').where('id', '=', id).executeTakeFirstOrThrow()
    expect(products.smiles).toBe('CCCCCl')
    // Peaks by boiling point on the invented column: solvent, 1-chlorobutane, then 1,1- < 1,2- < 1,3- < 1,4-dichlorobutane.
    const choices: Array<[string, string | RegExp]> = [
      ['1.405', 'Solvent'],
      ['2.262', 'Starting material'],
      ['3.418', /CCCC\(Cl\)Cl\)$/],
      ['3.902', /CCC\(CCl\)Cl\)$/],
      ['4.012', /CC\(CCCl\)Cl\)$/],
      ['5.731', /ClCCCCCl\)$/],
    ]
    for (const [rt, target] of choices) {
      const select = page.getByLabel(`What the peak at ${rt} min is`)
      const options = await select.locator('option').allTextContents()
      const label = options.find((o) => (typeof target === 'string' ? o === target : target.test(o)))
      expect(label, `${rt}: ${options.join(' | ')}`).toBeDefined()
      await select.selectOption({ label: label! })
    }
    await accessible(page, 'library-standard-run-mapping')
    await page.locator('[data-test="apply-mapping"]').click()
    await page.locator('[data-test="save-windows"]').click()
    await page.getByText('Windows and names saved').first().waitFor()

    const windows = await testDb().selectFrom('substrateWindows').selectAll().where('substrateId', '=', id).orderBy('rtMin').execute()
    expect(windows.map((w) => [w.kind, w.rtMin, w.rtMax])).toEqual([
      ['solvent', 1.325, 1.485],
      ['starting-material', 2.182, 2.342],
      ['product', 3.338, 3.498],
      // 3.902 and 4.012 are 0.110 min apart: ± 0.055 each, meeting at 3.957.
      ['product', 3.847, 3.957],
      ['product', 3.957, 4.067],
      ['product', 5.651, 5.811],
    ])
    await page.locator('[data-test="standard-run-list"] li').first().waitFor()
    await accessible(page, 'library-substrate-windows')
    // The one refused preview (CCN) shows in the console as a failed request; nothing else may.
    expect(tab.problems.filter((p) => !/status of 400/.test(p))).toEqual([])
    await tab.context.close()
  })

  it('typing an overlap is flagged at once; a shared substrate is read-only and shows a copy action', async () => {
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    const seeded = await testDb().selectFrom('substrates').select('id').where('name', '=', '2,3-dimethylbutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()
    await page.goto(`/library/substrates/${seeded.id}`)
    await page.getByText('Shared library').first().waitFor()
    expect(await page.locator('[data-test="window-rtMin"]').count()).toBe(0)
    await accessible(page, 'library-substrate-shared')
    await page.locator('[data-test="make-copy"]').click()
    await page.getByRole('heading', { name: '2,3-dimethylbutane (copy)' }).waitFor()
    await page.getByLabel('End (min) for solvent').fill('3.1')
    await page.getByText(/The windows for the solvent \(dichloromethane\) at 1\.20–3\.10 min and the starting material/).waitFor()
    await accessible(page, 'library-substrate-overlap')

    await page.goto('/library/methods/new')
    await page.getByLabel(/^Reagent/).selectOption({ label: 'Bromine and light' })
    await page.getByText('Bromine', { exact: true }).waitFor()
    expect(await page.locator('[data-test="method-halogen"]').textContent()).toContain('Bromine (Br)')
    await page.getByRole('button', { name: 'Add to my library' }).click()
    await page.getByText(/Say where the reactivities come from/).waitFor()
    await accessible(page, 'library-method-new')
    await tab.context.close()
  })

  it('a method page shows its source and the cautions; a TA reads the library on a phone', async () => {
    const tab = await openTab(browser, { width: 390, height: 844 })
    const { page } = tab
    await signInThroughPage(page, DEMO.ta1)
    const method = await testDb().selectFrom('methods').select('id').where('reagent', '=', 'so2cl2-azo').where('ownerId', 'is', null).executeTakeFirstOrThrow()
    await page.goto(`/library/methods/${method.id}`)
    await page.locator('[data-test="method-source"]').waitFor()
    await page.getByText('Sulfuryl chloride', { exact: true }).waitFor()
    await page.getByText('Azo initiators (AIBN)').waitFor()
    expect(await page.locator('[data-test="make-copy"]').count()).toBe(0)
    await accessible(page, 'library-method-phone')
    await page.goto('/library')
    await page.getByRole('link', { name: '2,3-dimethylbutane', exact: true }).waitFor()
    expect(await page.getByRole('link', { name: 'New substrate' }).count()).toBe(0)
    await accessible(page, 'library-phone')
    await tab.context.close()
  })
})
