import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshotFromTop, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { mondayAfter, practicalMeetingOnce } from '../support/stockroom'

// Prepared solutions and CAS numbers where the coordinator sees them: the forecast line of the
// demo's bicarbonate wash, linking a new wash as a % w/v solution, the catalog page. 1440 and 820 px.

const uid = randomUUID().slice(0, 8)
let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(() => Promise.all([browser?.close(), closeTestDb()]))

describe('prepared solutions in Chromium', () => {
  it.each([1440, 820])('the forecast counts a wash as its solid, and an item is linked as a %i px solution', async (width) => {
    const wash = `2 % carbonate wash ${uid} ${width}`
    const { items } = await practicalMeetingOnce(`sol ${uid} ${width}`, mondayAfter(7), 4, [
      { role: 'wash', name: wash, smiles: null, molarMass: null, density: null, basis: 'mL', amount: 10 },
    ])
    const solid = `sodium carbonate ${uid} ${width}`
    await testDb().insertInto('reagents')
      .values({ name: solid, casNumber: '497-19-8', physicalState: 'solid', containerSize: 500, unit: 'g', hazardCodes: [], hazards: [] })
      .execute()
    const { page, problems } = await openTab(browser, { width, height: 900 })
    await signInThroughPage(page, DEMO.coordinator)
    await page.goto('/stockroom/forecast')
    // The demo's 5 % w/v bicarbonate wash: grams of the solid, the water not stock.
    const bicarbonate = page.getByRole('row').filter({ hasText: 'sodium bicarbonate' }).first()
    await expect.poll(() => bicarbonate.locator('[data-test="prepared-solution"]').first().textContent())
      .toMatch(/5 % w\/v, 5 g per 100 mL, made up with water \(water, not stocked\)/)

    const row = page.locator('[data-test="unlinked-item"]').filter({ hasText: wash })
    await row.getByLabel(`Catalog reagent for ${wash}`).selectOption({ label: `${solid} (g)` })
    await row.getByLabel(`Prepared solution, % w/v (${wash})`).fill('2')
    const violations = await seriousViolations(page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshotFromTop(page, `stockroom-solution-forecast-${width}`)
    await row.getByRole('button', { name: 'Link' }).click()
    await page.getByText(`${wash} now draws on ${solid} as a 2 % w/v solution`).first().waitFor()
    const stored = await testDb().selectFrom('practicalItems').select(['solutionPercentWv']).where('id', '=', items[0]!.id).executeTakeFirstOrThrow()
    expect(stored.solutionPercentWv).toBe(2)

    const reagent = await testDb().selectFrom('reagents').select('id').where('name', '=', 'sodium bicarbonate').executeTakeFirstOrThrow()
    await page.goto(`/stockroom/catalog/${reagent.id}`)
    await page.getByText('144-55-8').first().waitFor()
    await page.getByText(/prepared solution, 5 % w\/v/).first().waitFor()
    await screenshotFromTop(page, `stockroom-solution-catalog-${width}`)
    expect(problems).toEqual([])
  })
})
