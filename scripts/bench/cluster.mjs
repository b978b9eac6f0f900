// Two server processes on one database against one: the built server started once alone and
// once as two processes behind Node's cluster module (scripts/lib/cluster.mjs), on the bench's
// database, with the same secrets, measured in alternating rounds with the same mix of signed-in
// routes. On two cores the load generator, PostgreSQL and the servers share the machine, so two
// processes give less than twice one; the figure is reported, it has no goal.
import autocannon from 'autocannon'
import pg from 'pg'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { onFreePort } from '../lib/ports.mjs'
import { startServer } from '../lib/processes.mjs'
import { randomSecret } from '../lib/env.mjs'
import { signIn } from '../lib/world.mjs'

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..')
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]

function run(url, requests, seconds) {
  return new Promise((resolve, reject) => {
    autocannon({ url, connections: 16, duration: seconds, requests }, (error, result) => (error ? reject(error) : resolve(result)))
  })
}

async function start(world, env, workers) {
  const { port, child } = await onFreePort(async (port) => {
    const child = await startServer({ root, port, env, workers, stdio: ['ignore', 'ignore', 'inherit'] })
    return { port, child }
  })
  const stop = () => new Promise((resolve) => {
    if (child.exitCode !== null) return resolve(undefined)
    child.once('exit', resolve)
    child.kill('SIGTERM')
  })
  return { baseUrl: `http://127.0.0.1:${port}`, stop }
}

/**
 * The mix: a student's home and overview, an instructor's courses and a practical, the course's
 * sections, the health probe. Routes that wait for the engine threads (the review
 * list computes outliers) are left out: they would measure the engine pool, not the processes.
 */
async function mixOf(world, baseUrl) {
  const client = new pg.Client({ connectionString: world.databaseUrl })
  await client.connect()
  const { rows: [practical] } = await client.query(
    `select id, course_id from practicals where title like 'Chlorination of 1-chlorobutane' limit 1`,
  )
  await client.end()
  const student = await signIn(baseUrl, 'student01@larkspur.example')
  const instructor = await signIn(baseUrl, 'instructor@larkspur.example')
  return [
    { path: '/api/me/lab', headers: { cookie: student } },
    { path: '/api/overview/student', headers: { cookie: student } },
    { path: '/api/courses', headers: { cookie: instructor } },
    { path: `/api/practicals/${practical.id}`, headers: { cookie: instructor } },
    { path: `/api/courses/${practical.course_id}/sections`, headers: { cookie: instructor } },
    { path: '/api/health', headers: {} },
  ]
}

export async function benchCluster(world, { rounds = 3, seconds = 6 } = {}) {
  // The same secrets for both, so one sign-in's cookies work on either.
  const env = {
    NUXT_DATABASE_URL: world.databaseUrl,
    NUXT_SESSION_PASSWORD: randomSecret(32),
    NUXT_SMTP_PORT: String(world.smtpPort),
    NUXT_DEMO_MAIL_DIR: world.mailDir,
  }
  const one = await start(world, env, 1)
  const two = await start(world, env, 2)
  try {
    const requests = await mixOf(world, one.baseUrl)
    const measured = { one: [], two: [] }
    for (let i = 0; i < rounds; i++) {
      for (const [key, server] of [['one', one], ['two', two]]) {
        const result = await run(server.baseUrl, requests, seconds)
        if (result.non2xx > 0 || result.errors > 0) {
          throw new Error(`${key} process(es): ${result.non2xx} non-2xx answers, ${result.errors} errors`)
        }
        measured[key].push(result.requests.average)
      }
    }
    const ratio = median(measured.two) / median(measured.one)
    return [{
      case: `mix of ${requests.length} routes, 16 connections`,
      oneProcessReqPerSec: median(measured.one),
      twoProcessesReqPerSec: median(measured.two),
      ratio,
      goal: 'reported (2 cores: expect < 2)',
    }]
  } finally {
    // autocannon stops timing before its last requests are answered: let them finish first.
    await new Promise((resolve) => setTimeout(resolve, 2000))
    await Promise.all([one.stop(), two.stop()])
  }
}
