import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { inject } from 'vitest'
import { testDb } from './db'
import { simpleParser, type ParsedMail } from 'mailparser'
import { clusterPaths, startCluster, stopCluster } from '../../scripts/lib/postgres.mjs'
import { killPidFile, startSmtpFake } from '../../scripts/lib/processes.mjs'

// Stop and start the real services behind the test server, to see how it copes. 'fast' ends
// every session with "terminating connection due to administrator command"; 'immediate'
// drops them without a word, as a crash would (recovery runs at the next start).
export function stopDatabase(mode: 'fast' | 'immediate' = 'fast') {
  stopCluster(clusterPaths(inject('pgRoot')), mode)
}

export function startDatabase() {
  startCluster(clusterPaths(inject('pgRoot')), inject('pgPort'))
}

export function stopSmtp() {
  killPidFile(inject('smtpPidFile'))
}

export async function startSmtp() {
  const child = await startSmtpFake({ root: inject('root'), port: inject('smtpPort'), dir: inject('mailDir'), pidFile: inject('smtpPidFile') })
  child.unref()
}

/** Every message the SMTP fake holds, parsed back with mailparser. */
export async function receivedMail(): Promise<Array<ParsedMail & { file: string }>> {
  const dir = inject('mailDir')
  const files = readdirSync(dir).filter((f) => f.endsWith('.eml')).sort()
  return Promise.all(files.map(async (file) => Object.assign(await simpleParser(readFileSync(join(dir, file))), { file })))
}

export async function mailTo(address: string) {
  return (await receivedMail()).filter((m) => (Array.isArray(m.to) ? m.to : [m.to]).some((t) => t?.text.includes(address)))
}

export async function eventually<T>(check: () => Promise<T | undefined | false>, timeoutMs = 15_000, intervalMs = 200): Promise<T> {
  const deadline = Date.now() + timeoutMs
  let last: unknown
  while (Date.now() < deadline) {
    try {
      const value = await check()
      if (value) return value
    } catch (error) {
      last = error
    }
    await new Promise((r) => setTimeout(r, intervalMs))
  }
  throw new Error(`condition not met within ${timeoutMs} ms${last ? `: ${String(last)}` : ''}`)
}

/**
 * Waits until the outbox holds `count` rows whose dedupe key is like `keyLike`, each 'sent', and
 * returns them. The worker hands a row's copy to SMTP before it marks the row sent, and never
 * claims a sent row again, so once this returns every copy the fake will ever receive of those
 * messages is in: a count of received mail taken after it cannot pass because a duplicate is late.
 */
export async function allSent(keyLike: string, count: number, timeoutMs = 30_000) {
  return eventually(async () => {
    const rows = await testDb().selectFrom('mailMessages').select(['id', 'dedupeKey', 'status', 'attempts'])
      .where('dedupeKey', 'like', keyLike).execute()
    return rows.length === count && rows.every((r) => r.status === 'sent') && rows
  }, timeoutMs)
}
