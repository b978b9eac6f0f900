import { mkdirSync, readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { join } from 'node:path'
import { expect, inject } from 'vitest'
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core'
import type AxeCore from 'axe-core'

// axe-core's script, once evaluated in the page, sets `window.axe`.
declare global {
  interface Window { axe: typeof AxeCore }
}

const require = createRequire(import.meta.url)
const axeSource = readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8')

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--disable-gpu', '--disable-quic'],
  })
}

export interface Tab {
  context: BrowserContext
  page: Page
  /** Console errors and CSP refusals seen so far: a page that logs them is broken. */
  problems: string[]
}

/** `timezoneId`: the zone the browser's clock is in (the machine's when not given). */
export async function openTab(
  browser: Browser, viewport = { width: 1280, height: 860 }, options: { timezoneId?: string } = {},
): Promise<Tab> {
  const context = await browser.newContext({ viewport, baseURL: inject('baseUrl'), reducedMotion: 'reduce', ...options })
  const page = await context.newPage()
  // Every full page load waits for the app to hydrate (plugins/hydrated.client.ts), so a test's
  // first click reaches Vue's handler instead of a page still starting up.
  const goto = page.goto.bind(page)
  page.goto = async (url, options) => {
    const response = await goto(url, options)
    await page.waitForFunction(() => document.documentElement.dataset.hydrated === 'true' || !window.document.querySelector('#__nuxt'))
    return response
  }
  const problems: string[] = []
  page.on('console', (message) => {
    if (message.type() === 'error') problems.push(message.text())
  })
  page.on('pageerror', (error) => problems.push(error.message))
  return { context, page, problems }
}

export interface AxeViolation {
  id: string
  impact: string | null
  help: string
  nodes: Array<{ target: string[] }>
}

/**
 * axe-core's own file, evaluated through the DevTools protocol (page CSP does not apply to it,
 * and nothing is fetched). Returns serious and critical violations only.
 */
export async function seriousViolations(page: Page): Promise<AxeViolation[]> {
  await page.evaluate(`${axeSource}\n;0`)
  const result = await page.evaluate(async () => {
    const { violations } = await window.axe.run(document, { resultTypes: ['violations'] })
    return violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.map((n) => ({ target: n.target })) }))
  })
  return (result as AxeViolation[]).filter((v) => v.impact === 'serious' || v.impact === 'critical')
}

export function describeViolations(violations: AxeViolation[]) {
  return violations.map((v) => `${v.impact} ${v.id}: ${v.help} at ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`).join('\n')
}

/** Fails the test on any serious or critical axe-core violation, listing them. */
export async function expectAccessible(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

/** A full-page screenshot from the top, so a sticky header does not land mid-page. */
export async function screenshotFromTop(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0))
  return screenshot(page, name)
}

export async function screenshot(page: Page, name: string) {
  const dir = join(inject('root'), 'test-results', 'screenshots')
  mkdirSync(dir, { recursive: true })
  const path = join(dir, `${name}.png`)
  await page.screenshot({ path, fullPage: true })
  return path
}

export async function signInThroughPage(page: Page, email: string, password = 'halocline-demo') {
  // Already sent to /login (with ?next=…)? Keep that URL.
  if (!page.url().includes('/login')) await page.goto('/login')
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel(/^Password/).fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.waitForURL((url) => !url.pathname.startsWith('/login'))
}

/** Fails when the whole page scrolls sideways (a wide table must wrap, stack or scroll in its own box). */
export async function expectNoSidewaysScroll(page: Page) {
  const { scrollWidth, clientWidth } = await page.evaluate(() => {
    const root = document.scrollingElement!
    return { scrollWidth: root.scrollWidth, clientWidth: root.clientWidth }
  })
  expect(scrollWidth, `the page is ${scrollWidth} px wide in a ${clientWidth} px window`).toBeLessThanOrEqual(clientWidth)
}
