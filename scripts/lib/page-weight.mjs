// What a cold load of a page costs in JavaScript: every .js file the browser fetched (module
// scripts, modulepreloads and prefetches alike) with its bytes on the wire, and which of them
// carry chart.js or zod. Shared by the delivery bench (scripts/bench/delivery.mjs) and the
// budget test (tests/e2e/delivery.browser.test.ts). Bytes are those of one build: no timing.

import { chromium } from 'playwright-core'

/** Debian's Chromium, as the browser tests start it (tests/support/browser.ts). */
export function launchBrowser() {
  return chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--disable-gpu', '--disable-quic'] })
}

// Strings that survive minification: an error message of chart.js, the class name zod gives
// its errors.
const LIBRARY_MARKERS = {
  chartJs: 'Canvas is already in use. Chart with ID',
  zod: 'ZodError',
}

// Nuxt prefetches chunks when the browser is idle after hydration: wait for the network to stay
// quiet this long after the load so those count too.
const QUIET_MS = 800

/**
 * Waits until no request has been open for QUIET_MS (playwright's "networkidle" fires at 500 ms
 * of quiet, before an idle-time prefetch may start).
 * @param {import('playwright-core').Page} page
 */
export async function networkQuiet(page) {
  let open = 0
  let last = Date.now()
  const started = () => { open++; last = Date.now() }
  const ended = () => { open--; last = Date.now() }
  page.on('request', started)
  page.on('requestfinished', ended)
  page.on('requestfailed', ended)
  try {
    while (open > 0 || Date.now() - last < QUIET_MS) await page.waitForTimeout(100)
  } finally {
    page.off('request', started)
    page.off('requestfinished', ended)
    page.off('requestfailed', ended)
  }
}

/**
 * Every .js file a page fetches from now on, with its bytes on the wire and which library it
 * carries. `scripts()` answers those fetched so far.
 * @param {import('playwright-core').Page} page
 */
export function trackScripts(page) {
  /** @type {Promise<{ url: string, bytes: number, encoding: string, chartJs: boolean, zod: boolean }>[]} */
  const pending = []
  page.on('requestfinished', (request) => {
    const url = new URL(request.url())
    if (!url.pathname.endsWith('.js') && !url.pathname.endsWith('.mjs')) return
    pending.push((async () => {
      const response = await request.response()
      const [sizes, body] = await Promise.all([request.sizes(), response ? response.text() : ''])
      return {
        url: url.pathname,
        bytes: sizes.responseBodySize,
        encoding: response?.headers()['content-encoding'] ?? 'identity',
        chartJs: body.includes(LIBRARY_MARKERS.chartJs),
        zod: body.includes(LIBRARY_MARKERS.zod),
      }
    })())
  })
  return { scripts: () => Promise.all(pending) }
}

/**
 * Loads `path` in a fresh browser context (empty cache; the session from `storageState` when
 * given) and counts the JavaScript it fetched.
 * @param {import('playwright-core').Browser} browser
 * @param {string} baseUrl
 * @param {string} path
 * @param {{ storageState?: any }} [options]
 */
export async function coldLoad(browser, baseUrl, path, { storageState } = {}) {
  const context = await browser.newContext({ baseURL: baseUrl, storageState, viewport: { width: 1280, height: 860 } })
  const page = await context.newPage()
  const tracked = trackScripts(page)
  try {
    const response = await page.goto(path, { waitUntil: 'load' })
    await networkQuiet(page)
    const scripts = await tracked.scripts()
    const links = await page.$$eval('a[href^="/"]:not([download])', (anchors) => anchors.map((a) => a.getAttribute('href') ?? ''))
    return {
      path,
      finalPath: new URL(page.url()).pathname,
      status: response?.status() ?? 0,
      jsBytes: scripts.reduce((sum, s) => sum + s.bytes, 0),
      scripts,
      chartJs: scripts.some((s) => s.chartJs),
      zod: scripts.some((s) => s.zod),
      links,
    }
  } finally {
    await context.close()
  }
}

/** The session of `email`, signed in through the login page, as playwright storage state. */
export async function signedInState(browser, baseUrl, email, password = 'halocline-demo') {
  const context = await browser.newContext({ baseURL: baseUrl })
  try {
    const page = await context.newPage()
    await page.goto('/login')
    await page.waitForFunction(() => document.documentElement.dataset.hydrated === 'true')
    await page.getByLabel('E-mail').fill(email)
    await page.getByLabel(/^Password/).fill(password)
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL((url) => !url.pathname.startsWith('/login'))
    return await context.storageState()
  } finally {
    await context.close()
  }
}

// One page per route pattern: /courses/3 and /courses/4 are the same page with other data.
const patternOf = (path) => path.replace(/\/\d+(?=\/|$)/g, '/[id]')
// Downloads, feeds and the API are not pages.
const isPage = (href) => !/^\/(api|_nuxt|_|calendar)\b/.test(href) && !/(\.(csv|ics|svg|png|json|txt|eml)|\/file)$/.test(href)

/**
 * Every page a signed-in user reaches by following links from `start`, one per route pattern,
 * each loaded cold. `limit` caps the walk.
 * @param {import('playwright-core').Browser} browser
 * @param {string} baseUrl
 * @param {any} storageState
 */
export async function walkPages(browser, baseUrl, storageState, { start = '/', limit = 40 } = {}) {
  const queue = [start]
  const seen = new Set([patternOf(start)])
  const loads = []
  while (queue.length && loads.length < limit) {
    const path = queue.shift()
    const load = await coldLoad(browser, baseUrl, path, { storageState })
    loads.push(load)
    for (const href of load.links) {
      const target = href.split('#')[0].split('?')[0]
      if (!target || !isPage(target) || seen.has(patternOf(target))) continue
      seen.add(patternOf(target))
      queue.push(target)
    }
  }
  return loads.map((load) => {
    const { links, ...rest } = load
    return { ...rest, pattern: patternOf(load.path), linkCount: links.length }
  })
}
