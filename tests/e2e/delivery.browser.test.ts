import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { coldLoad, signedInState } from '../../scripts/lib/page-weight.mjs'
import { LOGIN_JS_GOAL, SIGNED_IN_JS_GOAL } from '../../scripts/bench/delivery.mjs'
import { launchBrowser } from '../support/browser'
import { testDb } from '../support/db'
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

  // The heaviest signed-in pages. Their charts are lazy components (chart.js comes as a prefetch,
  // counted here, not ahead of the page) and their forms check input without zod.
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
