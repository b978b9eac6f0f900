import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO, signedIn } from '../support/http'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => { await browser?.close() })

describe('substrate explorer in Chromium', () => {
  it('shows products, predictions and reactivities from observed percentages', async () => {
    const tab = await openTab(browser, { width: 1280, height: 900 })
    await signInThroughPage(tab.page, DEMO.student(8))
    await tab.page.goto('/explorer')
    // The page opens on 2-methylbutane, analysed while rendered on the server with the reader's
    // session: four products (1-, 2-, 3- and 4-chloro positions), no "sign in" refusal.
    await tab.page.getByLabel('Observed mol % for position d').waitFor({ timeout: 15_000 })
    expect(await tab.page.getByLabel(/Observed mol % for position/).count()).toBe(4)
    expect(await tab.page.locator('main').innerText()).not.toContain('Sign in to continue')
    await tab.page.getByLabel(/^SMILES/).fill('CCC')
    await tab.page.getByRole('button', { name: 'Analyse' }).click()
    await tab.page.getByLabel('Observed mol % for position b').waitFor()
    await tab.page.getByLabel('Observed mol % for position a').fill('45')
    await tab.page.getByLabel('Observed mol % for position b').fill('55')
    await tab.page.getByRole('button', { name: 'Compute reactivities' }).click()
    // Propane at 45 : 55 → 3.67 (widely reported textbook figure; see tests/e2e/chemistry.test.ts).
    await tab.page.getByText('3.67').first().waitFor()
    await tab.page.locator('canvas').first().waitFor()
    const violations = await seriousViolations(tab.page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshot(tab.page, 'explorer-propane')
    expect(tab.problems).toEqual([])

    await tab.page.getByLabel(/^SMILES/).fill('CC(C)C(C)C')
    await tab.page.getByRole('button', { name: 'Analyse' }).click()
    await tab.page.getByText('C6H14', { exact: true }).waitFor()
    // 2,3-dimethylbutane: 12 primary H and 2 tertiary H, two products.
    expect(await tab.page.getByLabel(/Observed mol % for position/).count()).toBe(2)
    await screenshot(tab.page, 'explorer-dimethylbutane')
    await tab.context.close()
  })

  it('offers the demo class’s own result as the worked example, with the numbers it shows', async () => {
    // Student 08 is in the demo class (PRODUCT.md scenario); practical 1 has the seeded accepted runs.
    const api = await signedIn(DEMO.student(8))
    const example = (await api.get('/api/explorer/class-example')).body
    expect(example).toMatchObject({ practical: { title: 'Chlorination of 1-chlorobutane', courseCode: 'CHEM 2240' }, substrate: { name: '1-chlorobutane' } })
    expect(example!.n).toBeGreaterThan(5)
    expect(example!.percents).toHaveLength(4)
    const tab = await openTab(browser, { width: 1280, height: 900 })
    await signInThroughPage(tab.page, DEMO.student(8))
    await tab.page.goto('/explorer')
    const line = tab.page.locator('[data-test="class-example"]')
    await line.waitFor({ timeout: 60_000 })
    const text = await line.innerText()
    expect(text).not.toMatch(/propane|45 and 55/)
    for (const m of example!.percents) expect(text).toContain(`${m.percent.toFixed(1)} %`)
    await line.getByRole('button').click()
    const filled = () => tab.page.getByLabel(/Observed mol % for position/)
      .evaluateAll((inputs) => inputs.map((i) => Number((i as HTMLInputElement).value)).sort((a, b) => a - b))
    await expect.poll(filled, { timeout: 20_000 }).toEqual(example!.percents.map((m) => m.percent).sort((a, b) => a - b))
    await screenshot(tab.page, 'explorer-class-example')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('shows a bad SMILES beside the field', async () => {
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, DEMO.ta1)
    await tab.page.goto('/explorer')
    await tab.page.getByLabel(/^SMILES/).fill('CCN')
    await tab.page.getByRole('button', { name: 'Analyse' }).click()
    const field = tab.page.getByLabel(/^SMILES/)
    await expect.poll(async () => field.getAttribute('aria-invalid')).toBe('true')
    await tab.context.close()
  })

  it('says plainly when a SMILES is too large to analyse', async () => {
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, DEMO.ta1)
    await tab.page.goto('/explorer')
    await tab.page.getByLabel(/^SMILES/).fill('C'.repeat(41))
    await tab.page.getByRole('button', { name: 'Analyse' }).click()
    await tab.page.getByText(/Too large: at most 40 heavy atoms \(this one has 41\)/).first().waitFor()
    await screenshot(tab.page, 'explorer-too-large')
    expect(tab.problems.filter((p) => !/400/.test(p))).toEqual([])
    await tab.context.close()
  })
})
