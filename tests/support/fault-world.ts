import { randomUUID } from 'node:crypto'
import { existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import type { ChildProcess } from 'node:child_process'
import { inject } from 'vitest'
import pg from 'pg'
import type { Kysely } from 'kysely'
import { createDatabase } from '../../server/database/connection'
import type { Database } from '../../server/database/schema'
import * as tasks from '../../server/database/tasks'
import { onFreePort } from '../../scripts/lib/ports.mjs'
import { killPidFile, startServer, startSmtpFake } from '../../scripts/lib/processes.mjs'
import { randomSecret } from '../../scripts/lib/env.mjs'
import { eventually } from './services'
import { Client, DEMO } from './http'

// Fault tests kill and restart servers, so they run their own server processes (from the same
// build in .output, on free ports) instead of the shared e2e server. A fault world is a database
// of its own in the shared cluster, seeded with the demo, and its own SMTP fake; the shared
// server never touches its mail queue.

export interface ServerProcess {
  baseUrl: string
  child: ChildProcess
  /** Everything the process wrote, stdout and stderr. */
  output: () => string
  /** Lines Nitro writes when something escaped every handler; a fault test expects none. */
  escapedErrors: () => string[]
  kill: (signal?: NodeJS.Signals) => Promise<void>
}

export interface ServerOptions {
  databaseUrl: string
  smtpPort: number
  sessionPassword?: string
  mailDir?: string
  env?: Record<string, string>
}

const running = new Set<ServerProcess>()

/** A Halocline server from the built output, with its own port; its output is kept for the test. */
export async function startServerProcess(options: ServerOptions): Promise<ServerProcess> {
  const sessionPassword = options.sessionPassword ?? randomSecret(32)
  const { baseUrl, child } = await onFreePort(async (port: number) => {
    const baseUrl = `http://127.0.0.1:${port}`
    const child = await startServer({
      root: inject('root'),
      port,
      stdio: ['ignore', 'pipe', 'pipe'],
      env: {
        NUXT_DATABASE_URL: options.databaseUrl,
        NUXT_SESSION_PASSWORD: sessionPassword,
        NUXT_SMTP_PORT: String(options.smtpPort),
        NUXT_DEMO_MAIL_DIR: options.mailDir ?? '',
        NUXT_PUBLIC_APP_URL: baseUrl,
        NUXT_PUBLIC_DEMO: 'true',
        ...options.env,
      },
    }) as ChildProcess
    return { baseUrl, child }
  })
  const chunks: string[] = []
  child.stdout?.on('data', (c) => chunks.push(String(c)))
  child.stderr?.on('data', (c) => chunks.push(String(c)))
  const server: ServerProcess = {
    baseUrl,
    child,
    output: () => chunks.join(''),
    escapedErrors: () => chunks.join('').split('\n').filter((l) => /uncaughtException|unhandledRejection/i.test(l)),
    kill: async (signal = 'SIGTERM') => {
      running.delete(server)
      if (child.exitCode !== null || child.signalCode !== null) return
      const exited = new Promise((resolve) => child.once('exit', resolve))
      child.kill(signal)
      await exited
    },
  }
  running.add(server)
  // Answering HTTP is not enough: wait until it reaches the database (migrations are done).
  await eventually(async () => (await fetch(`${baseUrl}/api/health`)).status === 200, 30_000)
  return server
}

export async function stopAllServerProcesses() {
  await Promise.all([...running].map((s) => s.kill('SIGTERM')))
}

export interface FaultWorld {
  databaseUrl: string
  db: Kysely<Database>
  smtpPort: number
  mailDir: string
  /** The From address this world's servers send with: what tells its messages from any other world's. */
  sender: string
  sessionPassword: string
  /** While this file exists the SMTP fake holds new connections before its greeting. */
  holdFile: string
  startServer: (env?: Record<string, string>) => Promise<ServerProcess>
  startSmtp: () => Promise<void>
  /** SIGKILL: the fake stops at once, mid-conversation. */
  killSmtp: () => void
  /** How many connections the fake has held since it started. */
  heldConnections: () => number
  hold: (on: boolean) => void
  /** SIGTERM to every server this world started that is still running. */
  stopServers: () => Promise<void>
  close: () => Promise<void>
}

/** A seeded database of its own in the shared cluster, an SMTP fake of its own, and servers on demand. */
export async function createFaultWorld(name: string, serverEnv: Record<string, string> = {}): Promise<FaultWorld> {
  const shared = new URL(inject('databaseUrl'))
  const database = `halocline_${name}_${randomUUID().slice(0, 6)}`.replace(/\W/g, '_')
  const admin = new pg.Client({ connectionString: Object.assign(new URL(shared), { pathname: '/postgres' }).toString() })
  await admin.connect()
  await admin.query(`create database "${database}"`)
  await admin.end()
  const databaseUrl = Object.assign(new URL(shared), { pathname: `/${database}` }).toString()
  await tasks.migrate(databaseUrl)
  await tasks.seedDemoIfEmpty(databaseUrl)

  const runRoot = inject('pgRoot')
  const mailDir = join(runRoot, `mail-${database}`)
  const pidFile = join(runRoot, `smtp-${database}.pid`)
  const holdFile = join(runRoot, `smtp-${database}.hold`)
  let held = 0
  const startSmtpOn = async (port: number) => {
    const child = await startSmtpFake({ root: inject('root'), port, dir: mailDir, pidFile, holdFile, stdio: ['ignore', 'pipe', 'ignore'] }) as ChildProcess
    child.stdout?.on('data', (c) => { held += (String(c).match(/holding connection/g) ?? []).length })
    child.unref()
    return port
  }
  // The servers are told this port, so a restart (startSmtp) comes back on the same one.
  const smtpPort = await onFreePort(startSmtpOn)
  const startSmtp = async () => {
    await startSmtpOn(smtpPort)
  }
  const sessionPassword = randomSecret(32)
  const sender = `${database}@halocline.test`
  const db = createDatabase(databaseUrl, { max: 2, onError: () => {} })
  const mine = new Set<ServerProcess>()
  return {
    databaseUrl,
    db,
    smtpPort,
    mailDir,
    sender,
    sessionPassword,
    holdFile,
    startServer: async (env = {}) => {
      const server = await startServerProcess({ databaseUrl, smtpPort, mailDir, sessionPassword, env: { NUXT_SMTP_FROM: `Halocline <${sender}>`, ...serverEnv, ...env } })
      mine.add(server)
      return server
    },
    startSmtp,
    killSmtp: () => {
      killPidFile(pidFile, 'SIGKILL')
    },
    heldConnections: () => held,
    hold: (on) => (on ? writeFileSync(holdFile, '') : rmSync(holdFile, { force: true })),
    stopServers: async () => {
      await Promise.all([...mine].map((s) => s.kill('SIGTERM')))
      mine.clear()
    },
    close: async () => {
      rmSync(holdFile, { force: true })
      await Promise.all([...mine].map((s) => s.kill('SIGTERM')))
      killPidFile(pidFile, 'SIGKILL')
      await db.destroy()
    },
  }
}

/** The Message-ID of every .eml file the fake wrote. */
export function deliveredMessageIds(world: Pick<FaultWorld, 'mailDir' | 'sender'>): string[] {
  if (!existsSync(world.mailDir)) return []
  return readdirSync(world.mailDir).filter((f) => f.endsWith('.eml'))
    .map((f) => readFileSync(join(world.mailDir, f), 'utf8'))
    // Another world's server told an old port of ours would write here too: count only our own.
    .filter((text) => /^From:.*$/im.exec(text)?.[0].includes(world.sender))
    .map((text) => /^Message-ID:\s*(<[^>]+>)/im.exec(text)?.[1] ?? '(no Message-ID)')
}

/** The demo instructor sends a digest of the demo's first practical to all its sections, through `server`. */
export async function sendDemoDigest(world: FaultWorld, server: ServerProcess) {
  const practical = await world.db.selectFrom('practicals').select('id').orderBy('id').limit(1).executeTakeFirstOrThrow()
  const sections = await world.db.selectFrom('practicalSessions').select('sectionId').where('practicalId', '=', practical.id).execute()
  const instructor = new Client(server.baseUrl)
  await instructor.login(DEMO.instructor)
  const sent = await instructor.post(`/api/practicals/${practical.id}/digests`, { sectionIds: sections.map((s) => s.sectionId) }, { headers: { 'idempotency-key': randomUUID() } })
  if (sent.status !== 202) throw new Error(`digest not sent: ${sent.status} ${JSON.stringify(sent.body)}`)
  const digestIds: number[] = sent.body.digests.map((d: { id: number }) => d.id)
  const recipients = sent.body.digests.reduce((n: number, d: { recipientCount: number }) => n + d.recipientCount, 0) as number
  return { digestIds, recipients }
}

/** The rows of those digests' messages. */
export async function digestMessages(world: FaultWorld, digestIds: number[]) {
  const rows = await world.db.selectFrom('mailMessages').select(['id', 'dedupeKey', 'status', 'attempts', 'unknownOutcomes', 'claimedBy'])
    .where((eb) => eb.or(digestIds.map((id) => eb('dedupeKey', 'like', `digest:${id}:%`))))
    .orderBy('id').execute()
  return rows
}

/** The processes whose parent is `pid`, with their command lines (Linux /proc). */
export function childProcesses(pid: number): Array<{ pid: number, cmdline: string }> {
  const children: Array<{ pid: number, cmdline: string }> = []
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue
    try {
      // The parent is the 2nd field after the command name, which ends with the last ')'.
      const stat = readFileSync(`/proc/${entry}/stat`, 'utf8')
      if (Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) !== pid) continue
      children.push({ pid: Number(entry), cmdline: readFileSync(`/proc/${entry}/cmdline`, 'utf8').replace(/\0/g, ' ') })
    } catch {
      // gone meanwhile
    }
  }
  return children
}
