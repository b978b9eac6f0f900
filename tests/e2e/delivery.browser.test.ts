import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { coldLoad, networkQuiet, signedInState, trackScripts } from '../../scripts/lib/page-weight.mjs'
import { LOGIN_JS_GOAL, SIGNED_IN_JS_GOAL } from '../../scripts/bench/delivery.mjs'
import { launchBrowser } from '../support/browser'
import { TEST_PASSWORD, testDb } from '../support/db'
import { gcTable, makeGcPractical } from '../support/gc'
import { DEMO, signedIn } from '../support/http'

// JavaScript budgets, counted as bytes on the wire for a cold load in Chromium (empty cache,
// prefetches included). The bytes are those of one build, the same on every run: a budget, not a
// timing. `npm run bench -- delivery` walks every page of each role; this checks the pages the
// goals name.

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => { await browser?.close() })

const kB = (bytes: number) => `${(bytes / 1000).toFixed(1)} kB`
const listed = (load: Awaited<ReturnType<typeof coldLoad>>) => load.scripts.map((s) => `${s.url} ${s.bytes} ${s.encoding}`).join('\n')

describe('JavaScript a cold load transfers', () => {
  it(`the sign-in page stays within ${kB(LOGIN_JS_GOAL)}, compressed, without chart.js or zod`, async () => {
    const load = await coldLoad(browser, inject('baseUrl'), '/login')
    expect(load.status).toBe(200)
    expect(load.scripts.length).toBeGreaterThan(0)
    // Files under 1 kB are not worth compressing (the build leaves them as they are).
    for (const script of load.scripts.filter((s) => s.bytes >= 1024)) expect(['br', 'gzip'], script.url).toContain(script.encoding)
    expect(load.jsBytes, listed(load)).toBeLessThanOrEqual(LOGIN_JS_GOAL)
    expect(load.chartJs, listed(load)).toBe(false)
    expect(load.zod, listed(load)).toBe(false)
  })

  it('the instructor\'s overview draws no chart and loads no chart.js; a class result, which draws one, does', async () => {
    const state = await signedInState(browser, inject('baseUrl'), DEMO.instructor)
    const home = await coldLoad(browser, inject('baseUrl'), '/', { storageState: state })
    expect(home.finalPath).toBe('/')
    expect(home.chartJs, listed(home)).toBe(false)
    expect(home.zod, listed(home)).toBe(false)
    expect(home.jsBytes, listed(home)).toBeLessThanOrEqual(SIGNED_IN_JS_GOAL)

    // The marker is found where chart.js is used, so its absence above means something.
    const instructor = await signedIn(DEMO.instructor)
    const results = await instructor.get('/api/results')
    const id = results.body[0]?.practicalId
    expect(id, 'the demo has a practical with class results').toBeTruthy()
    const chartPage = await coldLoad(browser, inject('baseUrl'), `/results/practicals/${id}`, { storageState: state })
    expect(chartPage.chartJs, listed(chartPage)).toBe(true)
  })

  // The heaviest signed-in pages. Their charts are lazy components (chart.js comes when a chart
  // is drawn, counted here when it is) and their forms check input without zod.
  it.each([
    ['coordinator', DEMO.coordinator],
    ['instructor', DEMO.instructor],
  ])('the %s\'s stockroom forecast stays within the signed-in budget', async (_role, email) => {
    const state = await signedInState(browser, inject('baseUrl'), email)
    const load = await coldLoad(browser, inject('baseUrl'), '/stockroom/forecast', { storageState: state })
    expect(load.finalPath).toBe('/stockroom/forecast')
    expect(load.zod, listed(load)).toBe(false)
    expect(load.jsBytes, listed(load)).toBeLessThanOrEqual(SIGNED_IN_JS_GOAL)
  })

  it('a student\'s upload page for a practical stays within the signed-in budget', async () => {
    const practical = await testDb().selectFrom('practicals').select('id')
      .where('title', '=', 'Photochlorination of 2,3-dimethylbutane').executeTakeFirstOrThrow()
    const state = await signedInState(browser, inject('baseUrl'), DEMO.student(1))
    const path = `/practicals/${practical.id}/results`
    const load = await coldLoad(browser, inject('baseUrl'), path, { storageState: state })
    expect(load.finalPath).toBe(path)
    expect(load.zod, listed(load)).toBe(false)
    expect(load.jsBytes, listed(load)).toBeLessThanOrEqual(SIGNED_IN_JS_GOAL)
  })
})

// Lazy chart components are not prefetched (nuxt.config.ts, chartsWhenDrawn): chart.js comes
// when a chart is drawn, not because the page could draw one.
describe('chart.js comes with the first chart drawn', () => {
  /** A page in a fresh context, with every script it fetches from the start. */
  async function openTracked(path: string, storageState: Awaited<ReturnType<typeof signedInState>>) {
    const context = await browser.newContext({ baseURL: inject('baseUrl'), storageState, viewport: { width: 1280, height: 860 } })
    const page = await context.newPage()
    const tracked = trackScripts(page)
    await page.goto(path, { waitUntil: 'load' })
    await networkQuiet(page)
    const chartJsLoaded = async () => (await tracked.scripts()).some((s) => s.chartJs)
    return { context, page, chartJsLoaded }
  }

  it('the forecast of a range without meetings draws no chart and loads no chart.js; a range with meetings does both', async () => {
    const state = await signedInState(browser, inject('baseUrl'), DEMO.coordinator)
    const empty = await openTracked('/stockroom/forecast?from=2099-01-05&to=2099-02-01', state)
    try {
      await empty.page.getByRole('heading', { name: 'Week by week' }).waitFor()
      expect(await empty.page.locator('canvas').count()).toBe(0)
      expect(await empty.chartJsLoaded()).toBe(false)
    } finally {
      await empty.context.close()
    }

    const first = await testDb().selectFrom('practicalSessions').select((eb) => eb.fn.min('meetingDate').as('date'))
      .executeTakeFirstOrThrow()
    const from = String(first.date)
    const to = new Date(Date.parse(`${from}T00:00:00Z`) + 180 * 86_400_000).toISOString().slice(0, 10)
    const drawn = await openTracked(`/stockroom/forecast?from=${from}&to=${to}`, state)
    try {
      await drawn.page.locator('canvas').first().waitFor()
      await networkQuiet(drawn.page)
      expect(await drawn.chartJsLoaded()).toBe(true)
    } finally {
      await drawn.context.close()
    }
  })

  it('a student\'s results page loads chart.js only when the preview of an upload draws its chart', async () => {
    const practical = await makeGcPractical({ students: 2 })
    try {
      const state = await signedInState(browser, inject('baseUrl'), practical.students[0]!.email, TEST_PASSWORD)
      const tab = await openTracked(`/practicals/${practical.practicalId}/results`, state)
      try {
        await tab.page.getByRole('heading', { name: 'GC results', level: 1 }).waitFor()
        expect(await tab.chartJsLoaded()).toBe(false)
        const file = gcTable(practical, { seed: 7 }).text
        await tab.page.getByLabel('Choose a GC file').setInputFiles({ name: 'run-1.csv', mimeType: 'text/csv', buffer: Buffer.from(file) })
        await tab.page.locator('[data-test=gc-preview] canvas').waitFor()
        await networkQuiet(tab.page)
        expect(await tab.chartJsLoaded()).toBe(true)
      } finally {
        await tab.context.close()
      }
    } finally {
      await practical.cleanup()
    }
  })
})
