import { mkdirSync, rmSync } from 'node:fs'
import { join, resolve } from 'node:path'
import type { ChildProcess } from 'node:child_process'
import type { TestProject } from 'vitest/node'
import { clusterPaths, databaseUrl, ensureDatabase, initCluster, startCluster, stopCluster } from '../../scripts/lib/postgres.mjs'
import { ensureBuild } from '../../scripts/lib/build.mjs'
import { freePort } from '../../scripts/lib/ports.mjs'
import { killPidFile, startServer, startSmtpFake } from '../../scripts/lib/processes.mjs'
import { randomSecret } from '../../scripts/lib/env.mjs'
import { migrate, seedDemoIfEmpty } from '../../server/database/tasks'

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    databaseUrl: string
    pgRoot: string
    pgPort: number
    smtpPort: number
    smtpPidFile: string
    mailDir: string
    root: string
  }
}

// A throwaway world per run: its own cluster, port, mail folder and server, under .data/.
export default async function setup(project: TestProject) {
  const root = resolve(import.meta.dirname, '../..')
  const runRoot = join(root, '.data', `test-${process.pid}`)
  rmSync(runRoot, { recursive: true, force: true })
  mkdirSync(runRoot, { recursive: true })

  // Undo in reverse order, also when a later step of the set-up fails.
  const undo: Array<() => unknown> = [() => rmSync(runRoot, { recursive: true, force: true })]
  const teardown = async () => {
    for (const action of undo.reverse()) {
      try { await action() } catch { /* keep tearing down */ }
    }
  }
  try {
    const password = randomSecret(12)
    const pgPort = await freePort()
    const paths = clusterPaths(runRoot)
    initCluster(paths, password)
    startCluster(paths, pgPort)
    undo.push(() => stopCluster(paths, 'immediate'))
    await ensureDatabase({ password, port: pgPort, database: 'halocline_test' })
    const url = databaseUrl({ password, port: pgPort, database: 'halocline_test' })
    await migrate(url)
    await seedDemoIfEmpty(url)

    const mailDir = join(runRoot, 'mail')
    const smtpPort = await freePort()
    const smtpPidFile = join(runRoot, 'smtp.pid')
    await startSmtpFake({ root, port: smtpPort, dir: mailDir, pidFile: smtpPidFile })
    undo.push(() => killPidFile(smtpPidFile))

    ensureBuild(root)
    const port = await freePort()
    const server: ChildProcess = await startServer({
      root,
      port,
      stdio: ['ignore', 'ignore', 'inherit'],
      env: {
        NUXT_DATABASE_URL: url,
        NUXT_SESSION_PASSWORD: randomSecret(32),
        NUXT_SMTP_PORT: String(smtpPort),
        NUXT_MAIL_RETRY_DELAY_SECONDS: '1',
        NUXT_MAIL_POLL_SECONDS: '0.5',
        NUXT_DEMO_MAIL_DIR: mailDir,
        NUXT_PUBLIC_DEMO: 'true',
        NUXT_PUBLIC_APP_URL: `http://127.0.0.1:${port}`,
      },
    })
    undo.push(() => new Promise((resolve) => {
      if (server.exitCode !== null) return resolve(null)
      server.once('exit', resolve)
      server.kill('SIGTERM')
    }))

    project.provide('baseUrl', `http://127.0.0.1:${port}`)
    project.provide('databaseUrl', url)
    project.provide('pgRoot', runRoot)
    project.provide('pgPort', pgPort)
    project.provide('smtpPort', smtpPort)
    project.provide('smtpPidFile', smtpPidFile)
    project.provide('mailDir', mailDir)
    project.provide('root', root)
  } catch (error) {
    await teardown()
    throw error
  }
  return teardown
}
