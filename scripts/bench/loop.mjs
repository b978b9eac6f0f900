// How long the server's event loop is held while heavy requests run: GC uploads (100,000-point
// traces), chemistry (40-atom substrates with every product drawn, reactivities) and class
// summaries over 20,000 results, each for a few seconds with several clients, then all at once.
// The server measures its own loop (loop-probe.mjs, perf_hooks.monitorEventLoopDelay: p99 and
// max); a prober outside asks GET /api/health every 100 ms and keeps how long each answer took,
// which is what every other user feels. The idle phase is the baseline of the same run.
import { existsSync, readFileSync, statSync } from 'node:fs'
import pg from 'pg'
import { signIn } from '../lib/world.mjs'
import { trace } from './uploads.mjs'
import { fill } from './summary.mjs'

const LOOP_GOAL_MS = 50
const sleep = (ms) => new Promise((resolve) => setTimeout(resolve, ms))
const quantile = (xs, q) => (xs.length ? [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(q * xs.length))] : null)

/** What the probe in the server saw since the last call. */
async function loopDelay(world, file) {
  const before = existsSync(file) ? statSync(file).mtimeMs : 0
  process.kill(world.serverPid, 'SIGUSR2')
  for (let i = 0; i < 200; i++) {
    // The signal is handled on the loop: a held loop answers late, never not at all.
    if (existsSync(file) && statSync(file).mtimeMs !== before) return JSON.parse(readFileSync(file, 'utf8'))
    await sleep(25)
  }
  throw new Error('the loop probe did not answer (is NODE_OPTIONS=--import loop-probe.mjs set for the server?)')
}

/** Runs `clients` loops of `request` until `ms` have passed; returns the answers' statuses. */
async function load(clients, ms, request) {
  const until = Date.now() + ms
  const statuses = []
  await Promise.all(Array.from({ length: clients }, async (_, c) => {
    for (let i = 0; Date.now() < until; i++) statuses.push(await request(c, i))
  }))
  return statuses
}

/** The three kinds of heavy request, each a function of (client, iteration) returning a status. */
async function heavyRequests(world) {
  const client = new pg.Client({ connectionString: world.databaseUrl })
  await client.connect()
  const { rows: [practical] } = await client.query(`select id from practicals where title like 'Photochlorination%' limit 1`)
  const summaryPracticalId = await fill(client, 20_000)
  await client.end()
  const student = await signIn(world.baseUrl, 'student01@larkspur.example')
  const instructor = await signIn(world.baseUrl, 'instructor@larkspur.example')
  const traces = [0, 1, 2].map((v) => trace(100_000, v))
  const post = (path, cookie, body) => fetch(`${world.baseUrl}${path}`, {
    method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: JSON.stringify(body),
  })

  const upload = async (c, i) => {
    const form = new FormData()
    form.append('file', new Blob([traces[(c + i) % traces.length]], { type: 'text/csv' }), 'bench-trace.csv')
    const url = `${world.baseUrl}/api/practicals/${practical.id}/submissions/preview`
    const r = await fetch(url, { method: 'POST', body: form, headers: { cookie: student } })
    await r.arrayBuffer()
    return r.status
  }
  const chemistry = async (c, i) => {
    // A different chain length each time: nothing is answered from a cache.
    const carbons = 12 + ((c * 7 + i) % 29)
    const observed = [{ smiles: `ClC${'C'.repeat(carbons - 1)}`, percent: 30 }, { smiles: `CC(Cl)${'C'.repeat(carbons - 2)}`, percent: 70 }]
    const r = i % 2
      ? await post('/api/chemistry/reactivity', student, { smiles: 'C'.repeat(carbons), observed })
      : await post('/api/chemistry/analyze', student, { smiles: 'C'.repeat(carbons), productDepictions: true })
    await r.arrayBuffer()
    return r.status
  }
  const summary = async () => {
    const r = await fetch(`${world.baseUrl}/api/practicals/${summaryPracticalId}/summary`, { headers: { cookie: instructor } })
    await r.arrayBuffer()
    return r.status
  }
  return { upload, chemistry, summary }
}

/** One phase: the requests under load while /api/health is probed, and the loop delay it caused. */
async function measurePhase(world, name, requests, { seconds, clients }) {
  await loopDelay(world, world.loopProbeFile)
  const health = []
  let probing = true
  const prober = (async () => {
    while (probing) {
      const t = performance.now()
      await (await fetch(`${world.baseUrl}/api/health`)).arrayBuffer()
      health.push(performance.now() - t)
      await sleep(100)
    }
  })()
  const statuses = requests.length
    ? (await Promise.all(requests.map((request) => load(clients, seconds * 1000, request)))).flat()
    : (await sleep(seconds * 1000), [])
  probing = false
  await prober
  const loop = await loopDelay(world, world.loopProbeFile)
  return {
    case: name, requests: statuses.length, non200: statuses.filter((s) => s !== 200).length,
    loopP99Ms: loop.p99, loopMaxMs: loop.max, healthP99Ms: quantile(health, 0.99), healthMaxMs: Math.max(...health),
    goal: `p99 and max <= ${LOOP_GOAL_MS} ms: ${Math.max(loop.p99, loop.max) <= LOOP_GOAL_MS ? 'met' : 'MISSED'}`,
  }
}

export async function benchLoop(world, { seconds = 8, clients = 3 } = {}) {
  const { upload, chemistry, summary } = await heavyRequests(world)
  const phases = [
    ['idle (baseline)', []],
    ['uploads: 100,000-point traces', [upload]],
    ['chemistry: C12-C40, every product drawn', [chemistry]],
    ['summary of 20,000 results', [summary]],
    ['all of the above at once', [upload, chemistry, summary]],
  ]
  // One warm-up of each, so compiled code and caches are not what is measured.
  await Promise.all([upload(0, 0), chemistry(0, 0), summary()])
  const rows = []
  for (const [name, requests] of phases) rows.push(await measurePhase(world, name, requests, { seconds, clients }))
  return rows
}
