// The upload route's time for a 5,000-row peak table and a 100,000-point trace, each against
// papaparse parsing the same text alone in this process (the floor for reading the file at all).
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

async function upload(baseUrl, cookie, practicalId, text, name) {
  const form = new FormData()
  form.append('file', new Blob([text], { type: 'text/csv' }), name)
  const started = performance.now()
  const response = await fetch(`${baseUrl}/api/practicals/${practicalId}/submissions`, { method: 'POST', body: form, headers: { cookie } })
  const elapsed = performance.now() - started
  if (response.status !== 201) throw new Error(`upload ${name}: ${response.status} ${await response.text()}`)
  return elapsed
}

// A fresh server runs its first uploads in code V8 has not optimised yet (the engine worker's
// readers, the query builder): a few rounds of each case go first and are not counted, for the
// server and for papaparse alike.
export async function benchUploads(world, { repeats = 5, warmups = 3 } = {}) {
  const client = new pg.Client({ connectionString: world.databaseUrl })
  await client.connect()
  const { rows } = await client.query(`select p.id from practicals p where p.title like 'Photochlorination%' limit 1`)
  await client.end()
  const practicalId = rows[0].id
  const cookie = await signIn(world.baseUrl, 'student01@larkspur.example')
  const cases = [
    { name: 'POST submissions, 5,000-row peak table', make: (v) => peakTable(5000, v), goal: 5 },
    { name: 'POST submissions, 100,000-point trace', make: (v) => trace(100_000, v), goal: 3 },
  ]
  const results = []
  for (const c of cases) {
    const server = []
    const papa = []
    for (let i = -warmups; i < repeats; i++) {
      // A different file each round: the same bytes twice would be recognised and not recomputed.
      const text = c.make(i + warmups)
      const t = performance.now()
      Papa.parse(text, { skipEmptyLines: true })
      const parsed = performance.now() - t
      const elapsed = await upload(world.baseUrl, cookie, practicalId, text, `bench-${i + warmups}.csv`)
      if (i < 0) continue
      papa.push(parsed)
      server.push(elapsed)
    }
    const ratio = median(server) / median(papa)
    results.push({
      case: c.name,
      bytes: Buffer.byteLength(c.make(0)),
      papaparseMs: median(papa),
      serverMs: median(server),
      ratio,
      goal: `<= ${c.goal}: ${ratio <= c.goal ? 'met' : 'MISSED'}`,
    })
  }
  return results
}
