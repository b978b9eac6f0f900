// What the browser is sent: for each kind of answer (page, script, stylesheet, JSON, CSV) whether
// it is compressed when the request accepts it, how much smaller, and its Cache-Control; the
// JavaScript a cold load of every page of each role transfers (Chromium), against its budget;
// which pages load chart.js and zod; and what each compression level costs per answer.
import { request } from 'node:http'
import { brotliCompressSync, constants, gzipSync } from 'node:zlib'
import { signIn } from '../lib/world.mjs'
import { coldLoad, launchBrowser, signedInState, walkPages } from '../lib/page-weight.mjs'

export const LOGIN_JS_GOAL = 100_000
export const SIGNED_IN_JS_GOAL = 200_000

const ROLES = {
  instructor: 'instructor@larkspur.example',
  ta: 'ta1@larkspur.example',
  coordinator: 'coordinator@larkspur.example',
  student: 'student01@larkspur.example',
}

/** The raw answer (bytes as sent, not decoded) and its headers. */
function fetchRaw(url, headers = {}) {
  return new Promise((resolve, reject) => {
    request(url, { headers, agent: false }, (res) => {
      const chunks = []
      res.on('data', (c) => chunks.push(c))
      res.on('end', () => resolve({ status: res.statusCode, headers: res.headers, body: Buffer.concat(chunks) }))
    }).on('error', reject).end()
  })
}

const kB = (bytes) => Math.round(bytes / 100) / 10

function median(xs) {
  return [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]
}

/** Milliseconds to compress `body` once (median of a few), and the size it comes to. */
function compressCost(body, compress) {
  const times = []
  let size = 0
  for (let i = 0; i < 7; i++) {
    const started = process.hrtime.bigint()
    size = compress(body).length
    times.push(Number(process.hrtime.bigint() - started) / 1e6)
  }
  return { ms: median(times), size }
}

const brotli = (quality) => (body) => brotliCompressSync(body, { params: { [constants.BROTLI_PARAM_QUALITY]: quality } })

async function kinds(world) {
  const instructor = await signIn(world.baseUrl, ROLES.instructor)
  const login = await fetchRaw(`${world.baseUrl}/login`)
  const html = login.body.toString('utf8')
  const asset = (pattern) => html.match(pattern)?.[1]
  const jsAsset = asset(/<script[^>]+src="(\/_nuxt\/[^"]+\.js)"/) ?? asset(/href="(\/_nuxt\/[^"]+\.js)"/)
  const cssAsset = asset(/href="(\/_nuxt\/[^"]+\.css)"/)
  const json = async (path) => JSON.parse((await fetchRaw(`${world.baseUrl}${path}`, { cookie: instructor })).body.toString('utf8'))
  const courses = await json('/api/courses')
  const practicals = await json(`/api/courses/${courses[0]?.id}/practicals`)
  const practicalId = (Array.isArray(practicals) ? practicals : practicals.practicals ?? [])[0]?.id
  const immutable = 'public, max-age=31536000, immutable'
  const targets = [
    { kind: 'page HTML (signed in)', path: '/', cookie: instructor, cache: 'private, no-store' },
    { kind: 'page HTML (sign-in)', path: '/login', cache: 'no-cache' },
    { kind: 'JavaScript', path: jsAsset, cache: immutable },
    { kind: 'CSS', path: cssAsset, cache: immutable },
    { kind: 'JSON (signed in)', path: `/api/courses/${courses[0]?.id}/sections`, cookie: instructor, cache: 'private, no-store' },
    { kind: 'CSV (grade sheet)', path: `/practicals/${practicalId}/grades.csv`, cookie: instructor, cache: 'private, no-store' },
  ]
  const rows = []
  for (const target of targets) {
    if (!target.path || target.path.includes('undefined')) {
      rows.push({ case: target.kind, figure: 'not found', met: false })
      continue
    }
    const cookie = target.cookie ? { cookie: target.cookie } : {}
    const plain = await fetchRaw(`${world.baseUrl}${target.path}`, { ...cookie, 'accept-encoding': 'identity' })
    const packed = await fetchRaw(`${world.baseUrl}${target.path}`, { ...cookie, 'accept-encoding': 'gzip, deflate, br' })
    const gzipOnly = await fetchRaw(`${world.baseUrl}${target.path}`, { ...cookie, 'accept-encoding': 'gzip' })
    const encoding = packed.headers['content-encoding'] ?? 'none'
    const cacheControl = packed.headers['cache-control'] ?? '(none)'
    const body = plain.body
    // What compressing this answer once costs here, at the level used for dynamic answers (br 4),
    // at brotli's best (11, what the build uses for its files) and at gzip's default.
    const br4 = compressCost(body, brotli(4))
    const br11 = compressCost(body, brotli(11))
    const gz = compressCost(body, (b) => gzipSync(b))
    rows.push({
      case: `${target.kind} ${target.path.replace(/\/_nuxt\/.*/, '/_nuxt/…')}`,
      figure: `${encoding} (gzip only: ${gzipOnly.headers['content-encoding'] ?? 'none'}), ${kB(body.length)} -> ${kB(packed.body.length)} kB`,
      ratio: packed.body.length / body.length,
      goal: 'br or gzip',
      cacheControl,
      cacheGoal: target.cache,
      met: ['br', 'gzip'].includes(encoding) && gzipOnly.headers['content-encoding'] === 'gzip' && cacheControl === target.cache,
      compressMs: `br4 ${br4.ms.toFixed(2)} (${kB(br4.size)} kB), br11 ${br11.ms.toFixed(1)} (${kB(br11.size)} kB), gzip ${gz.ms.toFixed(2)} (${kB(gz.size)} kB)`,
    })
  }
  return rows
}

async function scripts(world) {
  const browser = await launchBrowser()
  try {
    const rows = []
    const login = await coldLoad(browser, world.baseUrl, '/login')
    rows.push({
      case: 'JS transferred, cold load of /login',
      figure: `${kB(login.jsBytes)} kB (goal <= ${LOGIN_JS_GOAL / 1000} kB)`,
      ratio: login.jsBytes / LOGIN_JS_GOAL,
      met: login.jsBytes <= LOGIN_JS_GOAL,
      chartJsOn: login.chartJs ? '/login' : '',
      zodOn: login.zod ? '/login' : '',
    })
    const pages = []
    for (const [role, email] of Object.entries(ROLES)) {
      const state = await signedInState(browser, world.baseUrl, email)
      const loads = await walkPages(browser, world.baseUrl, state)
      pages.push(...loads.map((l) => ({ role, ...l })))
      const largest = loads.reduce((a, b) => (b.jsBytes > a.jsBytes ? b : a))
      rows.push({
        case: `JS transferred, largest of ${loads.length} ${role} pages (${largest.pattern})`,
        figure: `${kB(largest.jsBytes)} kB (goal <= ${SIGNED_IN_JS_GOAL / 1000} kB)`,
        ratio: largest.jsBytes / SIGNED_IN_JS_GOAL,
        met: loads.every((l) => l.jsBytes <= SIGNED_IN_JS_GOAL),
        chartJsOn: loads.filter((l) => l.chartJs).map((l) => l.pattern).join(' '),
        zodOn: loads.filter((l) => l.zod).map((l) => l.pattern).join(' '),
      })
    }
    return { rows, pages }
  } finally {
    await browser.close()
  }
}

export async function benchDelivery(world) {
  const rows = await kinds(world)
  const weights = await scripts(world)
  // Every page's own figure, for whoever looks for the heavy one.
  if (process.env.HALOCLINE_BENCH_VERBOSE) {
    for (const p of weights.pages) {
      const marks = [p.chartJs ? 'chart.js' : '', p.zod ? 'zod' : ''].join(' ')
      console.log(`${p.role.padEnd(12)} ${String(kB(p.jsBytes)).padStart(6)} kB  ${p.path}  ${marks}`)
    }
  }
  return [...rows, ...weights.rows]
}
