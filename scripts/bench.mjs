#!/usr/bin/env node
// npm run bench: each case is measured against a baseline run side by side in the same
// process and reported as a ratio, so numbers compare across machines. Results are printed
// and written to test-results/bench.json. Nothing here is a test: no pass or fail.
// `npm run bench -- summary` runs one case (http, uploads, summary, signin, loop, delivery, cluster,
// department); several names run several.
import { mkdirSync, rmSync, writeFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import { step } from './lib/steps.mjs'
import { checkNodeVersion, ensurePostgres } from './lib/system.mjs'
import { ensureNodeModules } from './lib/deps.mjs'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')

async function main() {
  await step('Checking Node.js', checkNodeVersion)
  await step('Checking PostgreSQL server binaries', ensurePostgres)
  await step('Checking npm packages', () => ensureNodeModules(root))
  const { startWorld } = await import('./lib/world.mjs')
  // The server measures its own event loop for the "loop" case (bench/loop-probe.mjs).
  const loopProbeFile = join(root, '.data', `bench-loop-${process.pid}.json`)
  const loopProbe = pathToFileURL(join(root, 'scripts', 'bench', 'loop-probe.mjs')).href
  // Server-Timing on uploads: the uploads case prints where their time goes.
  const serverEnv = { NODE_OPTIONS: `--import ${loopProbe}`, HALOCLINE_LOOP_PROBE_FILE: loopProbeFile, NUXT_SERVER_TIMING: '1' }
  const world = await step('Starting a throwaway Halocline', async () => ({
    note: 'up',
    loopProbeFile,
    ...(await startWorld(root, { name: 'bench', serverEnv })),
  }))
  const results = {}
  try {
    const only = process.argv.slice(2)
    const cases = [
      ['http', 'Request throughput against a bare node:http server', () => import('./bench/http.mjs').then((m) => m.benchHttp(world))],
      ['uploads', 'Uploads against papaparse alone', () => import('./bench/uploads.mjs').then((m) => m.benchUploads(world))],
      ['summary', 'Class summary against the raw SQL', () => import('./bench/summary.mjs').then((m) => m.benchSummary(world))],
      ['signin', 'Sign-ins with argon2id against stored scrypt hashes',
        () => import('./bench/signin.mjs').then((m) => m.benchSignIn(world))],
      ['loop', 'Event-loop delay under uploads, chemistry and summaries', () => import('./bench/loop.mjs').then((m) => m.benchLoop(world))],
      ['delivery', 'Compression, caching and the JavaScript each page loads',
        () => import('./bench/delivery.mjs').then((m) => m.benchDelivery(world))],
      ['cluster', 'Two server processes against one on the same database',
        () => import('./bench/cluster.mjs').then((m) => m.benchCluster(world))],
      // Last: it adds a 2,000-student term to the database the cases above read.
      ['department', 'A department of 2,000 students: each role\'s routes at a tenth and at full size',
        () => import('./bench/department.mjs').then((m) => m.benchDepartment(world))],
    ]
    for (const [key, label, run] of cases) {
      if (only.length && !only.includes(key)) continue
      results[key] = await step(label, async () => Object.assign(await run(), { note: 'done' }))
    }
  } finally {
    await world.stop()
    rmSync(loopProbeFile, { force: true })
  }
  for (const [name, rows] of Object.entries(results)) {
    console.log(`\n${name}`)
    const rounded = (v) => (typeof v === 'number' ? Number(v.toPrecision(4)) : v)
    console.table(rows.map((r) => Object.fromEntries(Object.entries(r).map(([k, v]) => [k, rounded(v)]))))
  }
  mkdirSync(join(root, 'test-results'), { recursive: true })
  writeFileSync(join(root, 'test-results', 'bench.json'), JSON.stringify({ at: new Date().toISOString(), results }, null, 2))
}

main().catch((error) => {
  if (!error.reported) console.error(error)
  process.exit(1)
})
