#!/usr/bin/env node
// A CPU profile of the built server under load on one route, and its heaviest frames:
//   node scripts/bench/profile.mjs /api/me/lab student01@larkspur.example [seconds] [results]
// With `results` (e.g. 20000), a practical of that many results is added first (summary.mjs's
// fill) and `:id` in the path becomes its id.
// The server is profiled by cpu-probe.mjs (written on SIGUSR2 after the load); the profile stays in
// test-results/profiles/ for Chrome DevTools, and the top frames by self time are printed.
import { existsSync, mkdirSync, readFileSync } from 'node:fs'
import { setTimeout as sleep } from 'node:timers/promises'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import autocannon from 'autocannon'
import pg from 'pg'
import { fill } from './summary.mjs'
import { signIn, startWorld } from '../lib/world.mjs'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..')

/** Self time per function (name, file, line), heaviest first, as shares of all samples. */
export function topFrames(profile, count = 25) {
  const self = new Map()
  const byId = new Map(profile.nodes.map((n) => [n.id, n]))
  const hits = new Map()
  for (const id of profile.samples) hits.set(id, (hits.get(id) ?? 0) + 1)
  let total = 0
  for (const [id, n] of hits) {
    const { functionName, url, lineNumber } = byId.get(id).callFrame
    const key = `${functionName || '(anonymous)'} ${url.replace(/^.*\/(node_modules|\.output[^/]*)\//, '$1/')}:${lineNumber + 1}`
    self.set(key, (self.get(key) ?? 0) + n)
    total += n
  }
  return [...self].sort((a, b) => b[1] - a[1]).slice(0, count).map(([frame, n]) => ({ frame, self: `${((100 * n) / total).toFixed(1)} %` }))
}

async function main() {
  const [template, email, seconds = '10', results] = process.argv.slice(2)
  if (!template) throw new Error('usage: profile.mjs <path> [email] [seconds] [results]')
  let path = template
  const dir = join(root, 'test-results', 'profiles')
  mkdirSync(dir, { recursive: true })
  const file = join(dir, `${template.replace(/\W+/g, '-').replace(/^-|-$/g, '')}-${Date.now()}.cpuprofile`)
  const probe = pathToFileURL(join(root, 'scripts', 'bench', 'cpu-probe.mjs')).href
  const serverEnv = { NODE_OPTIONS: `--import ${probe}`, HALOCLINE_CPU_PROFILE_FILE: file }
  const world = await startWorld(root, { name: 'profile', serverEnv })
  try {
    if (results) {
      const client = new pg.Client({ connectionString: world.databaseUrl })
      await client.connect()
      path = template.replace(':id', String(await fill(client, Number(results))))
      await client.end()
    }
    const headers = email ? { cookie: await signIn(world.baseUrl, email) } : {}
    const result = await autocannon({ url: `${world.baseUrl}${path}`, connections: 10, duration: Number(seconds), headers })
    console.log(`${path}: ${result.requests.average} req/s, ${result.non2xx} non-2xx`)
    process.kill(world.serverPid, 'SIGUSR2')
    for (let i = 0; i < 100 && !existsSync(file); i++) await sleep(100)
  } finally {
    await world.stop()
  }
  console.log(file)
  console.table(topFrames(JSON.parse(readFileSync(file, 'utf8'))))
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main().catch((error) => {
    console.error(error)
    process.exit(1)
  })
}
