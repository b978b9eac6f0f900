#!/usr/bin/env node
// npm start: everything Halocline needs, on 127.0.0.1, from a fresh checkout. Each step prints
// one line; a failing step says what to do. The server is supervised: if it dies it is started
// again (back-off 1 s, 2 s, 4 s … 30 s), while PostgreSQL and the SMTP fake keep running.
// Ctrl-C (SIGINT) or SIGTERM stops what this script started.
import { mkdirSync } from 'node:fs'
import { dirname, join, relative, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { step } from './lib/steps.mjs'
import { checkNodeVersion, ensurePostgres } from './lib/system.mjs'
import { ensureNodeModules } from './lib/deps.mjs'
import { ensureEnvFile } from './lib/env.mjs'
import { clusterPaths, databaseUrl, ensureDatabase, initCluster, startCluster, stopCluster } from './lib/postgres.mjs'
import { ensureBuild } from './lib/build.mjs'
import { localCampusEnv, startIdentityProvider, startServer, startSmtpFake } from './lib/processes.mjs'
import { supervise } from './lib/supervise.mjs'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')
// HALOCLINE_DATA_DIR moves the cluster and the mail folder elsewhere (a throwaway run, a test).
const dataDir = resolve(process.env.HALOCLINE_DATA_DIR ?? join(root, '.data'))
const pgPort = Number(process.env.HALOCLINE_PG_PORT ?? 54329)
const smtpPort = Number(process.env.HALOCLINE_SMTP_PORT ?? 2525)
const idpPort = Number(process.env.HALOCLINE_IDP_PORT ?? 4455)
const port = Number(process.env.PORT ?? 3000)
const appUrl = `http://127.0.0.1:${port}`
const shown = (path) => relative(root, path) || '.'

const started = { cluster: null, smtp: null, idp: null, server: null }
const serverLog = []
let shuttingDown = false

async function shutdown(code = 0) {
  if (shuttingDown) return
  shuttingDown = true
  await Promise.all([started.server?.stop(), started.smtp?.stop(), started.idp?.stop()].map((p) => p?.catch(() => {})))
  if (started.cluster) {
    try { stopCluster(started.cluster) } catch { /* already down */ }
  }
  process.exit(code)
}
process.on('SIGINT', () => { console.log('\nStopping…'); void shutdown(0) })
process.on('SIGTERM', () => void shutdown(0))

/** Node, PostgreSQL binaries, packages and the secrets in .env; returns the secrets. */
async function checkPrerequisites() {
  await step('Checking Node.js', checkNodeVersion)
  await step('Checking PostgreSQL server binaries', ensurePostgres)
  await step('Checking npm packages', () => ensureNodeModules(root))
  mkdirSync(dataDir, { recursive: true })
  const { values } = await step('Checking secrets in .env', () => {
    const env = ensureEnvFile(join(root, '.env'))
    return { note: env.created ? 'written' : 'present', values: env.values }
  })
  return values
}

/** The database URL: the one the operator gave, else a local cluster of our own, started here. */
async function prepareDatabase(secrets) {
  const given = process.env.NUXT_DATABASE_URL ?? secrets.NUXT_DATABASE_URL
  if (given) {
    console.log('▸ Using the database in NUXT_DATABASE_URL (no local PostgreSQL started)')
    return given
  }
  const paths = clusterPaths(dataDir)
  const password = secrets.HALOCLINE_PG_PASSWORD
  await step(`Creating the PostgreSQL cluster in ${shown(paths.data)}`, () => (initCluster(paths, password) ? 'created' : 'exists'))
  await step(`Starting PostgreSQL on 127.0.0.1:${pgPort}`, () => {
    const didStart = startCluster(paths, pgPort)
    if (didStart) started.cluster = paths
    return didStart ? 'started' : 'already running'
  })
  const created = () => ensureDatabase({ password, port: pgPort, database: 'halocline' })
  await step('Creating the database', async () => ((await created()) ? 'created' : 'exists'))
  return databaseUrl({ password, port: pgPort, database: 'halocline' })
}

/** Migrations and, on an empty database, the demo scenario. */
async function migrateAndSeed(url) {
  // The database tasks are TypeScript shared with the server; tsx runs them in this process.
  const { register } = await import('tsx/esm/api')
  register()
  const tasks = await import('../server/database/tasks.ts')
  await step('Applying migrations', async () => `${(await tasks.migrate(url)).applied.length} applied`)
  await step('Loading the demo scenario', async () => ((await tasks.seedDemoIfEmpty(url)) ? 'seeded' : 'database has data; left as is'))
}

/** The SMTP fake, supervised; returns the folder it saves messages in. */
async function startMail() {
  const mailDir = join(dataDir, 'mail')
  await step(`Starting the local SMTP fake on 127.0.0.1:${smtpPort}`, async () => {
    started.smtp = supervise({
      name: 'The SMTP fake',
      log: (line) => console.error(`[start] ${line}`),
      start: () => startSmtpFake({ root, port: smtpPort, dir: mailDir }),
    })
    await started.smtp.first
    return `saving to ${shown(mailDir)}`
  })
  return mailDir
}

/**
 * Campus sign-in: the operator's provider when .env or the environment names one
 * (NUXT_CAMPUS_ISSUER), else the local stand-in, supervised like the SMTP fake.
 * Returns the NUXT_CAMPUS_* settings for the server ({} for the operator's own).
 */
async function startCampusProvider(secrets) {
  if (process.env.NUXT_CAMPUS_ISSUER ?? secrets.NUXT_CAMPUS_ISSUER) {
    console.log('▸ Using the identity provider in NUXT_CAMPUS_ISSUER (no local provider started)')
    return {}
  }
  const idp = { port: idpPort, clientId: 'halocline-local', clientSecret: secrets.HALOCLINE_IDP_CLIENT_SECRET }
  await step(`Starting the local identity provider on 127.0.0.1:${idpPort}`, async () => {
    started.idp = supervise({
      name: 'The identity provider',
      log: (line) => console.error(`[start] ${line}`),
      start: () => startIdentityProvider({ root, ...idp, appUrl }),
    })
    await started.idp.first
    return 'demo people only'
  })
  return localCampusEnv(idp)
}

let announced = false

/** The built server, supervised; its first log waits until the progress lines are done. */
async function serve(env) {
  await step(`Serving on ${appUrl}`, async () => {
    started.server = supervise({
      name: 'The server',
      log: (line) => console.error(`[start] ${line}`),
      start: async () => {
        const child = await startServer({ root, port, env })
        // Later servers' logs go straight out.
        if (announced) child.stdout?.pipe(process.stdout)
        else child.stdout?.on('data', (chunk) => serverLog.push(chunk))
        return child
      },
    })
    await started.server.first
    return 'up'
  })
}

/** Where to go and who to sign in as; then the server's log, held back until now. */
function announce(mailDir) {
  console.log(`
Halocline is running at ${appUrl}

Demo accounts (password: halocline-demo)
  instructor@larkspur.example    instructor
  ta1@larkspur.example           teaching assistant (Mon, Wed sections)
  ta2@larkspur.example           teaching assistant (Tue, Thu sections)
  coordinator@larkspur.example   lab coordinator (stockroom)
  student01@larkspur.example     student (… through student64@)

Campus sign-in goes to a local stand-in identity provider: the same e-mails (or demo
student ids such as LS2640137) and the same password.
E-mail goes to the local SMTP fake; read it at ${appUrl}/mailbox or in ${shown(mailDir)}/.
If the server stops, it is started again; PostgreSQL and the SMTP fake keep running.
Press Ctrl-C to stop everything.
`)
  announced = true
  for (const chunk of serverLog.splice(0)) process.stdout.write(chunk)
  const first = started.server.current()
  first?.stdout?.removeAllListeners('data')
  first?.stdout?.pipe(process.stdout)
}

async function main() {
  console.log('Halocline: preparing everything on 127.0.0.1\n')
  const secrets = await checkPrerequisites()
  const url = await prepareDatabase(secrets)
  await migrateAndSeed(url)
  const mailDir = await startMail()
  const campusEnv = await startCampusProvider(secrets)
  await step('Building the app', () => ensureBuild(root))
  await serve({
    NUXT_DATABASE_URL: url,
    NUXT_SESSION_PASSWORD: secrets.NUXT_SESSION_PASSWORD,
    NUXT_SMTP_HOST: '127.0.0.1',
    NUXT_SMTP_PORT: String(smtpPort),
    NUXT_DEMO_MAIL_DIR: mailDir,
    NUXT_PUBLIC_DEMO: 'true',
    NUXT_PUBLIC_APP_URL: appUrl,
    ...campusEnv,
    ...pickNuxtOverrides(secrets),
  })
  announce(mailDir)
}

// Anything the operator put in .env as NUXT_* (SMTP provider, proxy trust) wins over defaults.
function pickNuxtOverrides(values) {
  return Object.fromEntries(Object.entries(values).filter(([key]) => key.startsWith('NUXT_') && key !== 'NUXT_SESSION_PASSWORD'))
}

main().catch((error) => {
  if (!error.reported) console.error(error)
  shutdown(1)
})
