// A throwaway Halocline for benchmarks and tools: its own PostgreSQL cluster on a free port,
// migrated and seeded, the SMTP fake and the built server. The tests' global set-up does the
// same through vitest; this is the plain-Node version.
import { mkdirSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { clusterPaths, databaseUrl, ensureDatabase, initCluster, startCluster, stopCluster } from './postgres.mjs'
import { ensureBuild } from './build.mjs'
import { onFreePort } from './ports.mjs'
import { killPidFile, localCampusEnv, startIdentityProvider, startServer, startSmtpFake } from './processes.mjs'
import { randomSecret } from './env.mjs'

/**
 * A database of its own: a PostgreSQL cluster on a free port under .data/<name>-<pid>, migrated
 * and (unless `seed` is false) seeded. `undo` runs in reverse on stop(); a caller adds its own.
 * @param {string} root
 * @param {{ name?: string, database?: string, seed?: boolean, tasks?: any }} [options]
 */
export async function startDatabaseWorld(root, { name = 'world', database = 'halocline', seed = true, tasks = null } = {}) {
  const runRoot = join(root, '.data', `${name}-${process.pid}`)
  rmSync(runRoot, { recursive: true, force: true })
  mkdirSync(runRoot, { recursive: true })
  /** @type {Array<() => unknown>} */
  const undo = [() => rmSync(runRoot, { recursive: true, force: true })]
  const stop = async () => {
    for (const action of undo.reverse()) {
      try { await action() } catch { /* keep going */ }
    }
  }
  try {
    const password = randomSecret(12)
    const paths = clusterPaths(runRoot)
    initCluster(paths, password)
    const pgPort = await onFreePort(async (port) => {
      startCluster(paths, port)
      return port
    })
    undo.push(() => stopCluster(paths, 'immediate'))
    await ensureDatabase({ password, port: pgPort, database })
    const url = databaseUrl({ password, port: pgPort, database })
    // The database tasks are TypeScript; under vitest they come in already compiled, else tsx runs them.
    const db = tasks ?? await loadTasks()
    await db.migrate(url)
    if (seed) await db.seedDemoIfEmpty(url)
    return { databaseUrl: url, runRoot, pgPort, undo, stop }
  } catch (error) {
    await stop()
    throw error
  }
}

/**
 * The whole product: a database world (above), the SMTP fake and the built server.
 * Options: name (folder under .data), database, seed, serverEnv (extra NUXT_* for the server),
 * stdio (the server's), tasks (server/database/tasks.ts when the caller has already loaded it).
 * Returns the addresses of everything, and stop().
 * @param {string} root
 * @param {{ name?: string, database?: string, seed?: boolean, serverEnv?: Record<string, string>, stdio?: any, tasks?: any }} [options]
 */
export async function startWorld(root, { serverEnv = {}, stdio = ['ignore', 'ignore', 'inherit'], ...databaseOptions } = {}) {
  const { databaseUrl: url, runRoot, pgPort, undo, stop } = await startDatabaseWorld(root, databaseOptions)
  try {
    const smtpPidFile = join(runRoot, 'smtp.pid')
    const mailDir = join(runRoot, 'mail')
    // Every port is tried again on another when our child cannot bind it (ports.mjs onFreePort).
    const smtpPort = await onFreePort(async (port) => {
      await startSmtpFake({ root, port, dir: mailDir, pidFile: smtpPidFile })
      return port
    })
    undo.push(() => killPidFile(smtpPidFile))

    ensureBuild(root)
    // The local identity provider, so campus sign-in works in the tests as in the demo. It knows
    // the app's address, so a new app port means a new provider.
    const idpPidFile = join(runRoot, 'idp.pid')
    const { port, idp, server } = await onFreePort(async (port) => {
      const idp = await onFreePort(async (idpPort) => {
        const settings = { port: idpPort, clientId: 'halocline-test', clientSecret: randomSecret(18) }
        await startIdentityProvider({ root, ...settings, appUrl: `http://127.0.0.1:${port}`, pidFile: idpPidFile })
        return settings
      })
      try {
        const server = await startServer({
          root, port, stdio,
          env: {
            NUXT_DATABASE_URL: url,
            NUXT_SESSION_PASSWORD: randomSecret(32),
            NUXT_SMTP_PORT: String(smtpPort),
            NUXT_DEMO_MAIL_DIR: mailDir,
            NUXT_PUBLIC_APP_URL: `http://127.0.0.1:${port}`,
            ...localCampusEnv(idp),
            ...serverEnv,
          },
        })
        return { port, idp, server }
      } catch (error) {
        killPidFile(idpPidFile)
        throw error
      }
    })
    undo.push(() => killPidFile(idpPidFile))
    undo.push(() => new Promise((resolve) => {
      if (server.exitCode !== null) return resolve(undefined)
      server.once('exit', resolve)
      server.kill('SIGTERM')
    }))
    return {
      baseUrl: `http://127.0.0.1:${port}`, serverPid: server.pid, databaseUrl: url, runRoot, pgPort, smtpPort, smtpPidFile, mailDir,
      idpUrl: `http://127.0.0.1:${idp.port}`, idpPidFile, campusEnv: localCampusEnv(idp), stop,
    }
  } catch (error) {
    await stop()
    throw error
  }
}

async function loadTasks() {
  const { register } = await import('tsx/esm/api')
  register()
  return import('../../server/database/tasks.ts')
}

/** Signs in and returns the Cookie header value. */
export async function signIn(baseUrl, email, password = 'halocline-demo') {
  const response = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password }),
  })
  if (!response.ok) throw new Error(`sign-in failed for ${email}: ${response.status}`)
  return response.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
}
