import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
import { startWorld } from '../../scripts/lib/world.mjs'
import * as tasks from '../../server/database/tasks'

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    databaseUrl: string
    pgRoot: string
    pgPort: number
    smtpPort: number
    smtpPidFile: string
    mailDir: string
    /** The local identity provider the shared server's campus sign-in uses. */
    idpUrl: string
    /** The NUXT_CAMPUS_* settings of the shared server, for servers of a test's own. */
    campusEnv: Record<string, string>
    root: string
  }
}

// A throwaway world per run (its own cluster, ports, mail folder and server under .data/),
// shared by every e2e file; the same set-up the benchmarks use.
export default async function setup(project: TestProject) {
  const root = resolve(import.meta.dirname, '../..')
  const world = await startWorld(root, {
    name: 'test',
    tasks,
    database: 'halocline_test',
    serverEnv: {
      // Fast retries, so the mail tests see a failed attempt and the recovery within seconds.
      NUXT_MAIL_RETRY_DELAY_SECONDS: '1',
      NUXT_MAIL_POLL_SECONDS: '0.5',
      NUXT_PUBLIC_DEMO: 'true',
    },
  })
  project.provide('baseUrl', world.baseUrl)
  project.provide('databaseUrl', world.databaseUrl)
  project.provide('pgRoot', world.runRoot)
  project.provide('pgPort', world.pgPort)
  project.provide('smtpPort', world.smtpPort)
  project.provide('smtpPidFile', world.smtpPidFile)
  project.provide('mailDir', world.mailDir)
  project.provide('idpUrl', world.idpUrl)
  project.provide('campusEnv', world.campusEnv)
  project.provide('root', root)
  return world.stop
}
