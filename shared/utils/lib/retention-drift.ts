// Retention drift. Retention times move between sessions by a few hundredths of a minute or
// more (column ageing and trimming, carrier-gas flow, oven programme; common practice), so a
// product peak can land just outside the window set from last week's standard run. Such a
// peak is taken as the window's compound only when nothing else could claim it: the window is
// empty, the peak is nearer to it than to any other window, and no second peak competes for
// it. Everything else stays unassigned, with a flag that says why. Pure: no I/O, no clock.
import type { Peak } from './peak-table'
import type { Flag } from '../chromatography'

export interface DriftSlot {
  key: string
  /** How the window is named in messages: "1,2-dichlorobutane (CCC(Cl)CCl)", "the solvent". */
  name: string
  /** Only product windows take a drifted peak; solvent and starting-material windows only bound the others. */
  product: boolean
  productSmiles?: string
  window: { rtMin: number, rtMax: number }
  peaks: Peak[]
}

export interface DriftTolerance {
  /** Share of a window's width a peak may lie beyond either end. */
  fraction: number
  /** The least reach in minutes, however narrow the window. */
  minimumMinutes: number
}

/**
 * Defaults: half the window's width, at least 0.15 min (judgement, common practice: the drift
 * seen between sessions on a packed or capillary teaching column is a few hundredths to about a
 * tenth of a minute).
 */
export const DEFAULT_DRIFT_TOLERANCE: DriftTolerance = { fraction: 0.5, minimumMinutes: 0.15 }

export interface DriftedPeak {
  slot: DriftSlot
  peak: Peak
  /** Minutes outside the window: positive when the peak came later than the window's end, negative when earlier than its start. */
  minutes: number
}

export interface DriftOutcome {
  drifted: DriftedPeak[]
  /** Empty windows with more than one peak just outside: none was taken. */
  contested: Array<{ slot: DriftSlot, peaks: Peak[] }>
  /** Peaks just outside a window that already has its own peak (or a solvent / starting-material window). */
  beside: Array<{ slot: DriftSlot, peak: Peak }>
  /** Peaks exactly as near to two windows: given to neither. */
  between: Array<{ slots: DriftSlot[], peak: Peak }>
  /** What is still in no window. */
  unassigned: Peak[]
}

interface Reach { before: number, after: number }
interface Bounds { rtMin: number, rtMax: number }

/**
 * How far beyond each end of each window a peak may lie and still count as drifted: the
 * tolerance, cut at the midpoint of the gap to the neighbouring window on that side (zero when
 * windows touch or overlap), so two windows never reach over each other.
 */
export function driftReach(slots: readonly DriftSlot[], tolerance: DriftTolerance = DEFAULT_DRIFT_TOLERANCE): Reach[] {
  return slots.map((s) => {
    const { rtMin, rtMax } = s.window
    const tol = Math.max(tolerance.fraction * (rtMax - rtMin), tolerance.minimumMinutes)
    let gapBefore = Number.POSITIVE_INFINITY
    let gapAfter = Number.POSITIVE_INFINITY
    for (const o of slots) {
      if (o === s) continue
      if (o.window.rtMin <= rtMin) gapBefore = Math.min(gapBefore, rtMin - o.window.rtMax)
      if (o.window.rtMax >= rtMax) gapAfter = Math.min(gapAfter, o.window.rtMin - rtMax)
    }
    return { before: Math.min(tol, Math.max(0, gapBefore) / 2), after: Math.min(tol, Math.max(0, gapAfter) / 2) }
  })
}

/** Signed minutes outside the window within its reach, or null when the peak is not just outside it. */
function outside(rt: number, { rtMin, rtMax }: Bounds, reach: Reach): number | null {
  if (rt < rtMin && rt >= rtMin - reach.before && reach.before > 0) return rt - rtMin
  if (rt > rtMax && rt <= rtMax + reach.after && reach.after > 0) return rt - rtMax
  return null
}

/**
 * Gives each empty product window the one peak lying just outside it, when no other window
 * reaches that peak and no other peak lies just outside the same window. Decisions are made on
 * the windows as filled before any rescue, so the order of peaks never matters.
 */
export function rescueDriftedPeaks(slots: readonly DriftSlot[], unassigned: readonly Peak[], tolerance?: DriftTolerance): DriftOutcome {
  const reach = driftReach(slots, tolerance)
  // The windows' ends as objects of one shape (the windows come in several): read for every peak.
  const bounds: Bounds[] = slots.map(({ window: w }) => ({ rtMin: w.rtMin, rtMax: w.rtMax }))
  const near = new Map<DriftSlot, Peak[]>()
  const outcome: DriftOutcome = { drifted: [], contested: [], beside: [], between: [], unassigned: [] }
  for (const p of unassigned) {
    // Most unassigned peaks of a long table are near no window: find the first hit before building a list.
    let first = -1
    for (let i = 0; i < slots.length && first < 0; i++) if (outside(p.retentionTime, bounds[i]!, reach[i]!) !== null) first = i
    if (first < 0) { outcome.unassigned.push(p); continue }
    const hits = slots.filter((s, i) => i >= first && outside(p.retentionTime, bounds[i]!, reach[i]!) !== null)
    if (hits.length === 1) {
      const list = near.get(hits[0]!)
      if (list) list.push(p)
      else near.set(hits[0]!, [p])
    } else {
      outcome.unassigned.push(p)
    }
    // At the exact midpoint between two windows both reach it: it belongs to neither.
    if (hits.length > 1) outcome.between.push({ slots: hits, peak: p })
  }
  for (const [slot, peaks] of near) {
    if (slot.product && slot.peaks.length === 0 && peaks.length === 1) {
      const peak = peaks[0]!
      const i = slots.indexOf(slot)
      outcome.drifted.push({ slot, peak, minutes: outside(peak.retentionTime, bounds[i]!, reach[i]!)! })
      continue
    }
    outcome.unassigned.push(...peaks)
    if (slot.product && slot.peaks.length === 0) outcome.contested.push({ slot, peaks })
    else outcome.beside.push(...peaks.map((peak) => ({ slot, peak })))
  }
  for (const d of outcome.drifted) d.slot.peaks.push(d.peak)
  // Peaks given in time order (as a table lists them) stay in it without the sort: a stable sort of
  // them would keep that order, since peaks at one time fall to the same window or to none.
  if (inTimeOrder(unassigned)) {
    const taken = new Set(outcome.drifted.map((d) => d.peak))
    outcome.unassigned = taken.size ? unassigned.filter((p) => !taken.has(p)) : [...unassigned]
  } else {
    outcome.unassigned.sort((a, b) => a.retentionTime - b.retentionTime)
  }
  return outcome
}

function inTimeOrder(peaks: readonly Peak[]): boolean {
  for (let i = 1; i < peaks.length; i++) if (!(peaks[i - 1]!.retentionTime <= peaks[i]!.retentionTime)) return false
  return true
}

const fmt = (t: number) => t.toFixed(2)
const range = (s: DriftSlot) => `${fmt(s.window.rtMin)}–${fmt(s.window.rtMax)} min`
const CHECK = 'compare this run with the standard run, and ask your TA to re-check the windows'

/** The flags of drift: peaks taken across a window's edge, peaks left out beside one, peaks at an edge, and whether the shifts agree. */
export function driftFlags(slots: readonly DriftSlot[], outcome: DriftOutcome, edgeFraction: number): Flag[] {
  const flags: Flag[] = []
  for (const d of outcome.drifted) {
    const side = d.minutes > 0 ? 'after the end' : 'before the start'
    flags.push({
      code: 'retention-drift', severity: 'warning', productSmiles: d.slot.productSmiles, retentionTimes: [d.peak.retentionTime],
      message: `The peak at ${fmt(d.peak.retentionTime)} min came ${Math.abs(d.minutes).toFixed(2)} min ${side} of the window for ${d.slot.name} (${range(d.slot)}), which had no peak of its own, so it was counted as that product. Retention times seem to have drifted: ${CHECK}.`,
    })
  }
  for (const c of outcome.contested) {
    flags.push({
      code: 'retention-drift',
      severity: 'warning',
      productSmiles: c.slot.productSmiles,
      retentionTimes: c.peaks.map((p) => p.retentionTime),
      message: `${c.peaks.length} peaks (${timesList(c.peaks)}) lie just outside the empty window for ${c.slot.name} (${range(c.slot)}); none was counted, because only one of them can be that product. ${CHECK.charAt(0).toUpperCase()}${CHECK.slice(1)}.`,
    })
  }
  for (const [slot, peaks] of groupBy(outcome.beside, (b) => b.slot, (b) => b.peak)) flags.push(besideFlag(slot, peaks))
  for (const b of outcome.between) {
    flags.push({
      code: 'retention-drift', severity: 'warning', retentionTimes: [b.peak.retentionTime],
      message: `The peak at ${fmt(b.peak.retentionTime)} min lies midway between the windows for ${b.slots.map((s) => `${s.name} (${range(s)})`).join(' and ')} and was not counted: ask your TA to check the windows.`,
    })
  }
  const shifts: number[] = outcome.drifted.map((d) => d.minutes)
  const drifted = new Set(outcome.drifted.map((d) => d.peak))
  for (const s of slots) {
    const margin = edgeFraction * (s.window.rtMax - s.window.rtMin)
    const atEdge: Record<'start' | 'end', Peak[]> = { start: [], end: [] }
    for (const p of s.peaks) {
      if (drifted.has(p)) continue
      const late = s.window.rtMax - p.retentionTime < margin
      if (!late && p.retentionTime - s.window.rtMin >= margin) continue
      // Inside the window the direction is what counts: from its centre toward the edge.
      shifts.push(p.retentionTime - (s.window.rtMin + s.window.rtMax) / 2)
      atEdge[late ? 'end' : 'start'].push(p)
    }
    for (const edge of ['start', 'end'] as const) if (atEdge[edge].length) flags.push(edgeFlag(s, edge, atEdge[edge]))
  }
  const agreement = shiftAgreement(shifts, outcome.drifted.length)
  if (agreement) flags.push(agreement)
  return flags
}

// A long table can put dozens of peaks beside or at the edge of one window: they get one flag
// per window (and edge), listing their times, so neither the page nor the stored version fills
// with the same sentence.
const MAX_LISTED = 8

/** "3.61, 3.62, 3.64 min"; past MAX_LISTED the rest are counted ("… and 12 more min"). */
function timesList(peaks: readonly Peak[]): string {
  const shown = peaks.slice(0, MAX_LISTED).map((p) => fmt(p.retentionTime))
  const rest = peaks.length - shown.length
  return `${shown.join(', ')}${rest > 0 ? ` and ${rest} more` : ''} min`
}

function groupBy<T, K, V>(items: readonly T[], key: (item: T) => K, value: (item: T) => V): Map<K, V[]> {
  const groups = new Map<K, V[]>()
  for (const item of items) {
    const k = key(item)
    const group = groups.get(k)
    if (group) group.push(value(item))
    else groups.set(k, [value(item)])
  }
  return groups
}

function besideFlag(slot: DriftSlot, peaks: readonly Peak[]): Flag {
  const times = peaks.map((p) => p.retentionTime)
  if (peaks.length === 1) {
    const why = slot.product
      ? 'That window already has its peak, so this one is probably another compound (an impurity or a shoulder)'
      : 'If it is that compound, the retention times have drifted'
    return {
      code: 'retention-drift', severity: 'warning', retentionTimes: times,
      message: `The peak at ${fmt(times[0]!)} min lies just outside the window for ${slot.name} (${range(slot)}) and was not counted. ${why}: ask your TA to check the windows.`,
    }
  }
  const why = slot.product
    ? 'That window already has its peak, so these are probably other compounds (impurities or shoulders)'
    : 'If they are that compound, the retention times have drifted'
  return {
    code: 'retention-drift', severity: 'warning', retentionTimes: times,
    message: `${peaks.length} peaks (${timesList(peaks)}) lie just outside the window for ${slot.name} (${range(slot)}) and were not counted. ${why}: ask your TA to check the windows.`,
  }
}

function edgeFlag(slot: DriftSlot, edge: 'start' | 'end', peaks: readonly Peak[]): Flag {
  const times = peaks.map((p) => p.retentionTime)
  const where = peaks.length === 1
    ? `The peak at ${fmt(times[0]!)} min sits`
    : `${peaks.length} peaks (${timesList(peaks)}) sit`
  return {
    code: 'retention-drift', severity: 'info', retentionTimes: times,
    message: `${where} at the ${edge} of the window for ${slot.name} (${range(slot)}); retention times may have drifted, so compare with the standard run.`,
  }
}

/**
 * A shift of the whole run (column, flow, oven) moves every peak the same way; peaks moving
 * both ways point to a wrong assignment instead.
 */
function shiftAgreement(shifts: number[], driftedCount: number): Flag | null {
  if (shifts.length < 2) return null
  const later = shifts.filter((m) => m > 0).length
  const earlier = shifts.filter((m) => m < 0).length
  if (later === shifts.length || earlier === shifts.length) {
    const way = later ? 'later' : 'earlier'
    return {
      code: 'retention-drift', severity: 'info',
      message: `All ${shifts.length} peaks at or beyond a window edge came ${way} than their windows: the whole run seems shifted the same way, as when the column, carrier-gas flow or oven programme differs from the standard run's. Ask your TA to move the windows rather than re-integrating.`,
    }
  }
  if (driftedCount < 2) return null
  return {
    code: 'retention-drift', severity: 'info',
    message: `Peaks at window edges moved both ways (${later} later, ${earlier} earlier); a shift of the whole run would move them the same way, so check that each peak was given to the right product.`,
  }
}
