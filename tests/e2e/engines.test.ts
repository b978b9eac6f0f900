import type { ChildProcess } from 'node:child_process'
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest'
import { startServer } from '../../scripts/lib/processes.mjs'
import { onFreePort } from '../../scripts/lib/ports.mjs'
import { randomSecret } from '../../scripts/lib/env.mjs'
import { formatTrace, simulateTrace } from '../../shared/utils/simulation'
import { Client, DEMO, signedIn } from '../support/http'
import { makeGcPractical, uploadGc, type GcPractical } from '../support/gc'
import { TEST_PASSWORD } from '../support/db'

// Heavy work (reading SMILES and GC files, drawing molecules) runs in worker threads, so one
// user's expensive request cannot stall everyone else's; oversized SMILES are refused before
// any parser sees them. Order of answers is asserted here, never durations.

let student: Client
let gc: GcPractical
let uploader: Client
beforeAll(async () => {
  student = await signedIn(DEMO.student(9))
  gc = await makeGcPractical()
  uploader = await gc.signIn(gc.students[0]!)
})
afterAll(async () => { await gc?.cleanup() })

/** A raw detector trace of about 1.5 MB (100,000 points) with the practical's products in it: valid, and slow to read. */
function bigTrace(p: GcPractical, seed: number) {
  const peaks = p.windows.map((w) => ({ retentionTime: (w.rtMin + w.rtMax) / 2, area: 100, sigma: 0.02 }))
  return formatTrace(simulateTrace({ seed, duration: 8, points: 100_000, noise: 0.05, peaks }))
}

// The heaviest valid explorer request: a 40-carbon chain, its 20 products each drawn.
const bigAnalysis = { smiles: 'C'.repeat(40), productDepictions: true }

describe('oversized SMILES', () => {
  it('are refused with a 400 naming the field before anything parses them', async () => {
    const observed = Array.from({ length: 10 }, (_, i) => ({ smiles: 'C'.repeat(1000 - i), percent: 10 }))
    const reactivity = await student.post('/api/chemistry/reactivity', { smiles: 'CCC', observed })
    expect(reactivity.status).toBe(400)
    expect(reactivity.refusal.statusMessage).toBe('observed.0.smiles: Too large: at most 200 characters')

    const long = await student.post('/api/chemistry/analyze', { smiles: 'C'.repeat(1000) })
    expect(long.status).toBe(400)
    expect(long.refusal.statusMessage).toBe('smiles: Too large: at most 200 characters')

    const atoms = await student.post('/api/chemistry/analyze', { smiles: 'C'.repeat(41) })
    expect(atoms.status).toBe(400)
    expect(atoms.refusal.statusMessage).toBe('smiles: Too large: at most 40 heavy atoms (this one has 41)')
  })

  it('are refused by the substrate library and its windows too', async () => {
    const instructor = await signedIn(DEMO.instructor)
    const preview = await instructor.post('/api/substrates/preview', { smiles: `${'[CH2]'.repeat(60)}` })
    expect(preview.status).toBe(400)
    expect(preview.refusal.statusMessage).toMatch(/^smiles: Too large/)
    const created = await instructor.post('/api/substrates', { name: 'Too big', smiles: 'C'.repeat(300) })
    expect(created.status).toBe(400)
    expect(created.refusal.statusMessage).toMatch(/^smiles: Too large/)

    const butane = await instructor.post('/api/substrates', { name: 'Butane, engines test', smiles: 'CCCC' })
    expect(butane.status).toBe(201)
    try {
      const windows = await instructor.request(`/api/substrates/${butane.body.id}/windows`, {
        method: 'PUT', json: { windows: [{ kind: 'product', productSmiles: `Cl${'C'.repeat(41)}`, rtMin: 1, rtMax: 2 }] },
      })
      expect(windows.status).toBe(400)
      expect(windows.refusal.statusMessage).toBe('windows.0.productSmiles: Too large: at most 41 heavy atoms (this one has 42)')
    } finally {
      await instructor.request(`/api/substrates/${butane.body.id}`, { method: 'DELETE' })
    }
  })

  it('leave a substrate at the limit working, products drawn', async () => {
    const reply = await student.post('/api/chemistry/analyze', bigAnalysis)
    expect(reply.status).toBe(200)
    expect(reply.body.products).toHaveLength(20)
    for (const p of reply.body.products) expect(p.depictionSvg).toMatch(/^<svg/)
  })
})

describe('while expensive requests are computed', () => {
  it('the server still answers a health check before the first of them finishes', async () => {
    const done: string[] = []
    const track = <T>(name: string, reply: Promise<T>) => reply.then((r) => { done.push(name); return r })
    // Two 40-carbon analyses (small bodies, so their work starts at once), then two large traces.
    const analyses = [40, 39].map((n, i) => track(`analysis ${i}`, student.post('/api/chemistry/analyze', { smiles: 'C'.repeat(n) })))
    const uploads = [1, 2].map((seed, i) => track(`upload ${i}`, uploadGc(uploader, gc.practicalId, bigTrace(gc, seed), { preview: true, name: `trace-${seed}.csv` })))
    // Let the analyses reach the server and start.
    await new Promise((resolve) => setTimeout(resolve, 150))
    // A repeated SMILES may be answered from the chemistry cache before the check is even sent:
    // the order then proves nothing, so it is asserted only while the analysis is still running.
    const runningAtCheck = !done.includes('analysis 0')
    const health = await track('health', new Client().get('/api/health'))
    const replies = await Promise.all([...analyses, ...uploads])
    // On a server that computed on its request loop, the check waited for the analysis running when it came.
    if (runningAtCheck) expect(done.indexOf('health')).toBeLessThan(done.indexOf('analysis 0'))
    expect(health.status).toBe(200)
    expect(replies.map((r) => r.status)).toEqual([200, 200, 200, 200])
    expect((await uploads[0]!).body.kind).toBe('trace')
  })
})

describe('a task over its time budget', () => {
  let server: ChildProcess
  let baseUrl: string
  beforeAll(async () => {
    // A second server on the same database whose engines give each task a tenth of a second
    // and keep at most one task waiting.
    server = await onFreePort(async (port: number) => {
      baseUrl = `http://127.0.0.1:${port}`
      return await startServer({
        root: inject('root'), port, stdio: ['ignore', 'ignore', 'inherit'],
        env: {
          NUXT_DATABASE_URL: inject('databaseUrl'),
          NUXT_SESSION_PASSWORD: randomSecret(32),
          NUXT_SMTP_PORT: String(inject('smtpPort')),
          NUXT_PUBLIC_APP_URL: baseUrl,
          NUXT_ENGINES_TASK_TIMEOUT_MS: '100',
          NUXT_ENGINES_MAX_QUEUE: '1',
        },
      }) as ChildProcess
    })
  })
  afterAll(async () => {
    if (server.exitCode !== null) return
    await new Promise((resolve) => { server.once('exit', resolve); server.kill('SIGTERM') })
  })

  it('is stopped with a clear 422, and the server stays healthy and computes the next one', async () => {
    const client = new Client(baseUrl)
    await client.login(gc.students[0]!.email, TEST_PASSWORD)
    const upload = await uploadGc(client, gc.practicalId, bigTrace(gc, 7), { preview: true })
    expect(upload.status).toBe(422)
    expect(upload.refusal.statusMessage).toBe('file: took too long to compute (over 0.1 s) and was stopped')

    const analysis = await client.post('/api/chemistry/analyze', bigAnalysis)
    expect(analysis.status).toBe(422)
    expect(analysis.refusal.statusMessage).toMatch(/^smiles: took too long/)

    expect((await client.get('/api/health')).status).toBe(200)
    // The budget is 0.1 s and a replaced worker starts cold: on two loaded cores even propane can
    // run over once. What must hold is that the engine answers again, not a crash or a 500.
    let small = await client.post('/api/chemistry/analyze', { smiles: 'CCC' })
    for (let tries = 1; small.status === 422 && tries < 5; tries++) small = await client.post('/api/chemistry/analyze', { smiles: 'CCC' })
    expect(small.status).toBe(200)
    expect(small.body.products).toHaveLength(2)
  })

  it('when the queue is full, is refused at once with 503 and Retry-After rather than queued', async () => {
    const client = new Client(baseUrl)
    await client.login(gc.students[1]!.email, TEST_PASSWORD)
    const replies = await Promise.all(Array.from({ length: 8 }, () => client.post('/api/chemistry/analyze', bigAnalysis)))
    const busy = replies.filter((r) => r.status === 503)
    // One runs (and runs over), one waits; those that come while both places are taken are
    // refused. How many that is depends on how the requests interleave with the first's end.
    expect(busy.length).toBeGreaterThan(0)
    for (const r of busy) {
      expect(r.refusal.statusMessage).toBe('The server is busy with other calculations; try again in a few seconds')
      expect(Number(r.headers.get('retry-after'))).toBeGreaterThan(0)
    }
    expect(replies.filter((r) => r.status !== 503).every((r) => r.status === 422)).toBe(true)
    expect((await client.get('/api/health')).status).toBe(200)
  })
})
