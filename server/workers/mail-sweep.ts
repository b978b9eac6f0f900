import { isDatabaseUnavailable } from '../utils/errors'
import { mailSettings } from '../utils/mail'
import type { Presence } from '../utils/presence'
import { deadClaimants, releaseClaims } from './mail-delivery'
import { messageOf, type MailWorker } from './mail-worker'

/**
 * Every sweepSeconds (and at start): writes this process's pending outcomes, then sends again
 * the messages claimed by a server process that has died (its presence lock is gone), marked as
 * attempts of unknown outcome. A process judges others only once its own lock has been held for
 * a whole sweep interval: right after a database restart every lock is missing for a moment,
 * and a live process needs that long to take its lock back.
 */
export function startMailSweep(worker: MailWorker, presence: Presence) {
  const { sweepSeconds } = mailSettings()
  const graceMs = sweepSeconds * 1000
  let timer: ReturnType<typeof setTimeout> | undefined
  let stopped = false

  const sweep = async () => {
    try {
      if (!presence.held()) return
      await worker.reconcile()
      if (presence.heldForMs() < graceMs) return
      for (const claimant of await deadClaimants(presence.key)) {
        const ids = await releaseClaims(claimant, {
          whenDead: true,
          reason: 'The server process sending this message stopped before recording the outcome; sending again with the same Message-ID',
        })
        if (ids.length) {
          console.warn(`[mail] ${ids.length} message(s) held by a stopped server process (key ${claimant ?? 'none'}) queued again`)
          worker.wake()
        }
      }
    } catch (error) {
      if (!isDatabaseUnavailable(error)) console.warn(`[mail] sweep failed: ${messageOf(error)}`)
    }
  }

  const tick = async () => {
    await sweep()
    if (stopped) return
    // Come back as soon as the lock is old enough to judge others, else after a whole interval.
    const young = presence.held() && presence.heldForMs() < graceMs
    timer = setTimeout(tick, young ? graceMs - presence.heldForMs() + 50 : graceMs)
  }
  void tick()

  return () => {
    stopped = true
    clearTimeout(timer)
  }
}
