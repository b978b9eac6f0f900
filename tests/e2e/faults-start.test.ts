import { spawn } from 'node:child_process'
import { join } from 'node:path'
import { describe, expect, inject, it } from 'vitest'
import { freePort, isPortOpen } from '../../scripts/lib/ports.mjs'
import { clusterPaths, stopCluster } from '../../scripts/lib/postgres.mjs'
import { childProcesses } from '../support/fault-world'
import { eventually } from '../support/services'

// npm start as a user runs it (scripts/start.mjs, in a throwaway data folder and on free
// ports): a server that dies is started again while PostgreSQL and the SMTP fake stay up, and
// only SIGINT (Ctrl-C) stops everything.

describe('npm start supervision', () => {
  it('a server killed with SIGKILL comes back with a log line; SIGINT stops the server, the SMTP fake, the identity provider and PostgreSQL', async () => {
    const root = inject('root')
    const dataDir = join(inject('pgRoot'), 'npm-start')
    const [port, pgPort, smtpPort, idpPort] = await Promise.all([freePort(), freePort(), freePort(), freePort()])
    const env: Record<string, string | undefined> = {
      ...process.env,
      HALOCLINE_DATA_DIR: dataDir,
      PORT: String(port),
      HALOCLINE_PG_PORT: String(pgPort),
      HALOCLINE_SMTP_PORT: String(smtpPort),
      HALOCLINE_IDP_PORT: String(idpPort),
    }
    delete env.NUXT_DATABASE_URL
    const start = spawn(process.execPath, [join(root, 'scripts', 'start.mjs')], { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] })
    let output = ''
    start.stdout.on('data', (c) => { output += String(c) })
    start.stderr.on('data', (c) => { output += String(c) })
    const exited = new Promise<number | null>((resolve) => start.once('exit', resolve))
    const health = () => fetch(`http://127.0.0.1:${port}/api/health`).then((r) => r.status, () => 0)
    const serverPid = () => childProcesses(start.pid!).find((p) => p.cmdline.includes(join('server', 'index.mjs')))?.pid
    try {
      await eventually(async () => output.includes('Halocline is running'), 170_000, 250)
      // Campus sign-in is wired to the local identity provider: the start goes there.
      const campusStart = await fetch(`http://127.0.0.1:${port}/auth/campus/start`, { redirect: 'manual' })
      expect(campusStart.status).toBe(302)
      expect(campusStart.headers.get('location')).toMatch(new RegExp(`^http://127\\.0\\.0\\.1:${idpPort}/auth\\?`))
      const first = serverPid()
      expect(first).toBeDefined()
      process.kill(first!, 'SIGKILL')
      await eventually(async () => /The server stopped \(signal SIGKILL\); starting it again in 1 s/.test(output), 10_000, 100)
      await eventually(async () => (await health()) === 200, 30_000, 200)
      expect(serverPid()).not.toBe(first)
      expect(await isPortOpen(pgPort)).toBe(true)
      expect(await isPortOpen(smtpPort)).toBe(true)
      expect(await isPortOpen(idpPort)).toBe(true)

      start.kill('SIGINT')
      expect(await exited).toBe(0)
      expect(await isPortOpen(port)).toBe(false)
      expect(await isPortOpen(smtpPort)).toBe(false)
      expect(await isPortOpen(idpPort)).toBe(false)
      expect(await isPortOpen(pgPort)).toBe(false)
    } finally {
      if (start.exitCode === null) {
        start.kill('SIGINT')
        await exited
      }
      try { stopCluster(clusterPaths(dataDir), 'immediate') } catch { /* already stopped */ }
    }
  }, 240_000)
})
