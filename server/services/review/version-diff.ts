import type { StoredFlag } from '../../database/schema'
import type { PeakView, StoredResult } from '#shared/types/submission'
import type { ReviewFactorKey, PeakChange, VersionDiff } from '#shared/types/review'

// What changed between two versions of a work unit: peaks matched by their assignment (in
// elution order within a product, solvent or starting-material window) and, for unassigned
// peaks, by the nearest retention time; then mole %, factors and flags.

export interface DiffSide {
  id: number
  version: number
  peaks: PeakView[]
  result: Pick<StoredResult, 'molePercents' | 'factors'>
  flags: StoredFlag[]
}

// Closer than this, an unassigned peak is taken to be the same peak in both versions (minutes).
const UNASSIGNED_MATCH_MIN = 0.1
// Smaller differences are rounding in the export, not a change.
const RT_EPSILON_MIN = 0.0005
const AREA_RELATIVE_EPSILON = 1e-4

const point = (p: PeakView) => ({ retentionTime: p.retentionTime, area: p.area })

function differs(a: PeakView, b: PeakView): boolean {
  return Math.abs(a.retentionTime - b.retentionTime) > RT_EPSILON_MIN
    || Math.abs(a.area - b.area) > AREA_RELATIVE_EPSILON * Math.max(Math.abs(a.area), Math.abs(b.area), 1)
}

function pairPeaks(before: PeakView[], after: PeakView[]): Array<[PeakView | null, PeakView | null]> {
  const pairs: Array<[PeakView | null, PeakView | null]> = []
  const byRt = (a: PeakView, b: PeakView) => a.retentionTime - b.retentionTime
  const keys = new Set([...before, ...after].map((p) => p.assignedTo).filter((k): k is string => k !== null))
  for (const key of keys) {
    const a = before.filter((p) => p.assignedTo === key).sort(byRt)
    const b = after.filter((p) => p.assignedTo === key).sort(byRt)
    for (let i = 0; i < Math.max(a.length, b.length); i++) pairs.push([a[i] ?? null, b[i] ?? null])
  }
  const left = before.filter((p) => p.assignedTo === null).sort(byRt)
  const right = after.filter((p) => p.assignedTo === null).sort(byRt)
  for (const a of left) {
    let best = -1
    for (let i = 0; i < right.length; i++) {
      const gap = Math.abs(right[i]!.retentionTime - a.retentionTime)
      if (gap <= UNASSIGNED_MATCH_MIN && (best < 0 || gap < Math.abs(right[best]!.retentionTime - a.retentionTime))) best = i
    }
    pairs.push([a, best >= 0 ? right.splice(best, 1)[0]! : null])
  }
  for (const b of right) pairs.push([null, b])
  return pairs
}

export function diffVersions(from: DiffSide, to: DiffSide, labels: Map<string, string>): VersionDiff {
  const peaks: PeakChange[] = []
  let unchangedPeaks = 0
  for (const [a, b] of pairPeaks(from.peaks, to.peaks)) {
    const assignedTo = (a ?? b)!.assignedTo
    if (a && b && !differs(a, b)) unchangedPeaks++
    else peaks.push({ assignedTo, before: a && point(a), after: b && point(b), change: !a ? 'added' : !b ? 'removed' : 'changed' })
  }
  peaks.sort((x, y) => (x.after ?? x.before)!.retentionTime - (y.after ?? y.before)!.retentionTime)
  const smiles = [...new Set([...from.result.molePercents, ...to.result.molePercents].map((m) => m.smiles))]
  const percentOf = (side: DiffSide, s: string) => side.result.molePercents.find((m) => m.smiles === s)?.percent ?? null
  const factorNames: ReviewFactorKey[] = ['secondaryToPrimary', 'tertiaryToPrimary']
  const codes = (side: DiffSide) => new Set(side.flags.map((f) => f.code))
  const [before, after] = [codes(from), codes(to)]
  return {
    fromId: from.id,
    fromVersion: from.version,
    toId: to.id,
    toVersion: to.version,
    peaks,
    unchangedPeaks,
    molePercents: smiles.map((s) => {
      const [x, y] = [percentOf(from, s), percentOf(to, s)]
      return { smiles: s, label: labels.get(s) ?? s, before: x, after: y, delta: x !== null && y !== null ? y - x : null }
    }).sort((p, q) => p.label.localeCompare(q.label)),
    factors: factorNames
      .map((name) => ({ name, before: from.result.factors[name], after: to.result.factors[name] }))
      .filter((f) => f.before !== null || f.after !== null),
    flagsAdded: [...after].filter((c) => !before.has(c)),
    flagsRemoved: [...before].filter((c) => !after.has(c)),
  }
}
