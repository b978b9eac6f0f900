// The upload route's time for a 5,000-row peak table and a 100,000-point trace, each against
// papaparse parsing the same text alone in this process (the floor for reading the file at all).
import http from 'node:http'
import Papa from 'papaparse'
import pg from 'pg'
import { signIn } from '../lib/world.mjs'

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]

export function peakTable(rows, variant) {
  const lines = ['Peak,Ret. Time (min),Area,Area %']
  for (let i = 0; i < rows; i++) {
    const retention = (0.5 + i * 0.0019).toFixed(4)
    const area = (1000 + ((i * 7919 + variant) % 5000)).toFixed(1)
    lines.push(`${i + 1},${retention},${area},`)
  }
  return `${lines.join('\n')}\n`
}

export function trace(points, variant) {
  const lines = ['Time (min),Signal (pA)']
  const peaks = [1.4, 1.9, 3.12, 3.62]
  for (let i = 0; i < points; i++) {
    const t = (i * 8) / points
    let v = 0.5 + 0.01 * t + 0.02 * Math.sin(i * 12.9898 + variant)
    for (const c of peaks) v += 300 * Math.exp(-0.5 * ((t - c) / 0.012) ** 2)
    lines.push(`${t.toFixed(5)},${v.toFixed(4)}`)
  }
  return `${lines.join('\n')}\n`
}

// The form is encoded before the clock starts and sent over a kept-alive socket, so the time is
// the server's (and the loopback's): fetch building a FormData body took about ten milliseconds
// of the client's own for the peak table, more than the server's whole answer.
function multipartBody(text, name) {
  const boundary = `----halocline-bench-${Math.random().toString(16).slice(2)}`
  const head = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${name}"\r\nContent-Type: text/csv\r\n\r\n`
  return { boundary, body: Buffer.concat([Buffer.from(head), Buffer.from(text), Buffer.from(`\r\n--${boundary}--\r\n`)]) }
}

const agent = new http.Agent({ keepAlive: true, maxSockets: 1 })

/** The server's own Server-Timing (NUXT_SERVER_TIMING, set by bench.mjs) as name → ms. */
function serverTiming(header = '') {
  return Object.fromEntries(header.split(',').filter(Boolean).map((item) => {
    const [name, ...params] = item.trim().split(';')
    return [name, Number(params.find((p) => p.startsWith('dur='))?.slice(4))]
  }))
}

// Where the time goes, median of each metric over the counted rounds: when the handler had the
// file (body) and the caller's access (access), the engine's span and the worker's own time in
// it, the unit's statement (beside the engine), the store, and the whole handler; what the
// client saw beyond the handler is HTTP, the session and the loopback.
const METRICS = ['body', 'access', 'engine', 'worker', 'unit', 'store', 'handler']
function whereTheTimeGoes(timings, serverMs) {
  if (!timings.every((t) => 'handler' in t)) return 'no Server-Timing (NUXT_SERVER_TIMING unset)'
  const m = Object.fromEntries(METRICS.map((k) => [k, median(timings.map((t) => t[k] ?? NaN))]))
  return `body ${m.body.toFixed(1)} · access ${m.access.toFixed(1)} · engine ${m.engine.toFixed(1)} (worker ${m.worker.toFixed(1)})`
    + ` · unit ${m.unit.toFixed(1)} · store ${m.store.toFixed(1)} · handler ${m.handler.toFixed(1)} · outside it ${(serverMs - m.handler).toFixed(1)}`
}

function upload(baseUrl, cookie, practicalId, text, name) {
  const { boundary, body } = multipartBody(text, name)
  const url = new URL(`/api/practicals/${practicalId}/submissions`, baseUrl)
  return new Promise((resolve, reject) => {
    const started = performance.now()
    const request = http.request(url, {
      method: 'POST',
      agent,
      headers: { cookie, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': body.length },
    }, (response) => {
      const chunks = []
      response.on('data', (chunk) => chunks.push(chunk))
      response.on('end', () => {
        const elapsed = performance.now() - started
        if (response.statusCode !== 201) reject(new Error(`upload ${name}: ${response.statusCode} ${Buffer.concat(chunks)}`))
        else resolve({ elapsed, timing: serverTiming(response.headers['server-timing']) })
      })
    })
    request.on('error', reject)
    request.end(body)
  })
}

// A fresh server runs its first uploads in code V8 has not optimised yet (the engine worker's
// readers, the query builder; about ten uploads): those rounds of each case go first and are not
// counted, for the server and for papaparse alike. papaparse's figure is its fastest of three
// reads of each text, so the floor is a warm one, never inflated by a collection in this process.
// After the counted rounds, the peak table is sent `settle` more times and its last `repeats`
// rounds are reported too, for information: how much of the first figure is code V8 has not
// optimised yet. The goal is judged on the first.
export async function benchUploads(world, { repeats = 15, warmups = 10, settle = 40 } = {}) {
  const client = new pg.Client({ connectionString: world.databaseUrl })
  await client.connect()
  const { rows } = await client.query(`select p.id from practicals p where p.title like 'Photochlorination%' limit 1`)
  await client.end()
  const practicalId = rows[0].id
  const cookie = await signIn(world.baseUrl, 'student01@larkspur.example')
  const peaks = { name: 'POST submissions, 5,000-row peak table', make: (v) => peakTable(5000, v), goal: 5 }
  const cases = [
    { ...peaks, skip: warmups, count: repeats },
    { name: 'POST submissions, 100,000-point trace', make: (v) => trace(100_000, v), goal: 3, skip: warmups, count: repeats },
    {
      ...peaks,
      name: `${peaks.name}, after ${warmups + repeats + settle} earlier ones`,
      goal: null,
      skip: settle,
      count: repeats,
      from: warmups + repeats,
    },
  ]
  const results = []
  for (const c of cases) {
    const server = []
    const papa = []
    const timings = []
    const from = c.from ?? 0
    // A different file each round: the same bytes twice would be recognised and not recomputed.
    const texts = Array.from({ length: c.skip + c.count }, (_, k) => c.make(from + k))
    // papaparse reads every text first, then the uploads go back to back: read between them, the
    // garbage its arrays left was collected in this process while it waited for an answer, and
    // about 2 ms of that landed in the server's figure.
    for (const text of texts.slice(c.skip)) {
      let parsed = Infinity
      for (let k = 0; k < 3; k++) {
        const t = performance.now()
        Papa.parse(text, { skipEmptyLines: true })
        parsed = Math.min(parsed, performance.now() - t)
      }
      papa.push(parsed)
    }
    for (const [k, text] of texts.entries()) {
      const { elapsed, timing } = await upload(world.baseUrl, cookie, practicalId, text, `bench-${from + k}.csv`)
      if (k < c.skip) continue
      server.push(elapsed)
      timings.push(timing)
    }
    const ratio = median(server) / median(papa)
    results.push({
      case: c.name,
      bytes: Buffer.byteLength(c.make(0)),
      papaparseMs: median(papa),
      serverMs: median(server),
      ratio,
      goal: c.goal === null ? 'for information' : `<= ${c.goal}: ${ratio <= c.goal ? 'met' : 'MISSED'}`,
      whereTheTimeGoesMs: whereTheTimeGoes(timings, median(server)),
    })
  }
  return results
}
