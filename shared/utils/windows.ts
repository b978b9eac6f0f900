// Retention-time windows of a substrate: which of them overlap, and what a standard run
// suggests for them. Pure and light (no openchemlib), so the window editor runs the same checks
// in the browser that the server runs before saving.

export interface TimeWindow {
  rtMin: number
  rtMax: number
}

export interface NamedTimeWindow extends TimeWindow {
  /** How the window is named in messages: "b (CC(Cl)CCCl)", "solvent". */
  name: string
  /**
   * The chromatogram the window belongs to: the halogen of the products it holds. Windows of
   * chlorination products never meet bromination products in one run; null (solvent, starting
   * material) belongs to every run.
   */
  group?: string | null
}

/** Default half-width of a window suggested around a standard peak (minutes); common practice. */
export const DEFAULT_WINDOW_HALF_WIDTH = 0.08

const sameRun = (a: NamedTimeWindow, b: NamedTimeWindow) => a.group == null || b.group == null || a.group === b.group

/**
 * Every pair of windows that share some time in the same run, earlier-starting first. Windows
 * that only touch (one ends where the next starts) do not overlap: suggestions are cut that way.
 */
export function findWindowOverlaps<T extends NamedTimeWindow>(windows: readonly T[]): Array<[T, T]> {
  const sorted = [...windows].sort((a, b) => a.rtMin - b.rtMin || a.rtMax - b.rtMax)
  const pairs: Array<[T, T]> = []
  for (let i = 0; i < sorted.length; i++) {
    for (let j = i + 1; j < sorted.length; j++) {
      const a = sorted[i]!
      const b = sorted[j]!
      // Sorted by start: once one starts after a ends, every later one does too.
      if (b.rtMin >= a.rtMax) break
      if (sameRun(a, b)) pairs.push([a, b])
    }
  }
  return pairs
}

export const formatWindow = (w: TimeWindow, digits = 2) => `${w.rtMin.toFixed(digits)}–${w.rtMax.toFixed(digits)} min`

/** One sentence naming the two windows, for the API error and the editor alike. */
export function describeOverlap([a, b]: [NamedTimeWindow, NamedTimeWindow]): string {
  return `The windows for ${a.name} at ${formatWindow(a)} and ${b.name} at ${formatWindow(b)} overlap; a peak where they meet could be counted for either.`
}

export interface SuggestedWindow {
  peakIndex: number
  rt: number
  suggestedWindow: TimeWindow
}

// Rounded inward to 0.001 min, so that two windows cut at the midpoint between their peaks
// touch at most and never overlap after rounding. The epsilon absorbs binary representation
// (3.32 × 1000 = 3319.9999999999995).
const ceil3 = (x: number) => Math.ceil(x * 1000 - 1e-6) / 1000
const floor3 = (x: number) => Math.floor(x * 1000 + 1e-6) / 1000

/**
 * A window around each standard peak: its retention time ± the half-width, or ± half the
 * distance to the nearest other peak when that is smaller, never below 0 min.
 */
export function suggestWindows(retentionTimes: readonly number[], options: { halfWidth?: number } = {}): SuggestedWindow[] {
  const halfWidth = options.halfWidth ?? DEFAULT_WINDOW_HALF_WIDTH
  if (!(halfWidth > 0) || !Number.isFinite(halfWidth)) throw new RangeError('The half-width must be a positive number of minutes.')
  return retentionTimes.map((rt, peakIndex) => {
    let nearest = Infinity
    retentionTimes.forEach((other, j) => {
      if (j !== peakIndex && other !== rt) nearest = Math.min(nearest, Math.abs(other - rt))
    })
    const half = Math.min(halfWidth, nearest / 2)
    let rtMin = Math.max(0, ceil3(rt - half))
    let rtMax = floor3(rt + half)
    // Peaks a few thousandths of a minute apart: keep the exact bounds rather than none.
    if (!(rtMax > rtMin)) {
      rtMin = Math.max(0, rt - half)
      rtMax = rt + half
    }
    return { peakIndex, rt, suggestedWindow: { rtMin, rtMax } }
  })
}

/** The first window whose closed range holds the retention time, or null. */
export function windowHolding<T extends TimeWindow>(rt: number, windows: readonly T[]): T | null {
  return windows.find((w) => rt >= w.rtMin && rt <= w.rtMax) ?? null
}

export interface PeakForMapping {
  retentionTime: number
  area: number
}

export interface SavedWindowRef extends TimeWindow {
  kind: 'product' | 'solvent' | 'starting-material'
  productSmiles: string | null
}

export interface PeakMappingSuggestion extends SuggestedWindow {
  area: number
  /** The saved window that already holds the peak: where the instructor's mapping starts. */
  current: { kind: SavedWindowRef['kind'], productSmiles: string | null } | null
}

/** Suggested windows for a standard run's peaks, each with the saved window it falls in. */
export function suggestionsForRun(
  peaks: readonly PeakForMapping[],
  saved: readonly SavedWindowRef[],
  options: { halfWidth?: number } = {},
): PeakMappingSuggestion[] {
  return suggestWindows(peaks.map((p) => p.retentionTime), options).map((s) => {
    const holder = windowHolding(s.rt, saved)
    return { ...s, area: peaks[s.peakIndex]!.area, current: holder ? { kind: holder.kind, productSmiles: holder.productSmiles } : null }
  })
}

export interface WindowIdentity {
  kind: 'product' | 'solvent' | 'starting-material'
  /** Position letter of the product. */
  position?: string | null
  halogen?: 'Cl' | 'Br' | null
  productSmiles?: string | null
  label?: string | null
}

/** How a window is named in messages: "b (CC(Cl)CCCl)", "b, bromo product (…)", "the solvent (dichloromethane)". */
export function windowDisplayName(w: WindowIdentity): string {
  if (w.kind === 'product') return `${w.position ?? '?'}${w.halogen === 'Br' ? ', bromo product' : ''} (${w.productSmiles ?? ''})`
  const custom = w.label && !['solvent', 'starting material'].includes(w.label) ? ` (${w.label})` : ''
  return `${w.kind === 'solvent' ? 'the solvent' : 'the starting material'}${custom}`
}

/** One row of the window editor: every window the substrate can have, set or not. */
export interface WindowDraft extends WindowIdentity {
  /** 'solvent', 'starting-material', or the halogen and product: 'Cl:ClCCCCCl'. */
  key: string
  productSmiles: string | null
  position: string | null
  halogen: 'Cl' | 'Br' | null
  label: string
  /** The product's name as the editor shows it (its own or the built-in one); '' for none. */
  name: string
  rtMin: number | null
  rtMax: number | null
  responseFactor: number | null
}

interface DraftProduct { label: string, smiles: string, brominated: string, name?: string | null, brominatedName?: string | null }
interface DraftProduct {
  label: string
  smiles: string
  brominated: string
  name?: string | null
  brominatedName?: string | null
}
interface DraftSaved {
  kind: WindowDraft['kind']
  productSmiles: string | null
  label: string
  rtMin: number
  rtMax: number
  responseFactor: number
}
export const draftKeyOf = (kind: WindowDraft['kind'], halogen: 'Cl' | 'Br' | null, productSmiles: string | null) =>
  kind === 'product' ? `${halogen}:${productSmiles}` : kind

/** Solvent, starting material, then each product for chlorination and for bromination. */
export function windowDrafts(products: readonly DraftProduct[], saved: readonly DraftSaved[]): WindowDraft[] {
  const row = (
    kind: WindowDraft['kind'],
    halogen: 'Cl' | 'Br' | null,
    productSmiles: string | null,
    position: string | null,
    fallback: string,
    name: string | null = null,
  ): WindowDraft => {
    const s = saved.find((w) => w.kind === kind && (kind !== 'product' || w.productSmiles === productSmiles))
    return {
      key: draftKeyOf(kind, halogen, productSmiles), kind, productSmiles, position, halogen,
      label: s ? (kind === 'solvent' && s.label === 'solvent' ? '' : s.label) : fallback, name: name ?? '',
      rtMin: s?.rtMin ?? null, rtMax: s?.rtMax ?? null, responseFactor: s?.responseFactor ?? 1,
    }
  }
  return [
    // The solvent's name is typed by the instructor; empty means the plain word 'solvent'.
    row('solvent', null, null, null, ''),
    row('starting-material', null, null, null, 'starting material'),
    ...products.map((p) => row('product', 'Cl', p.smiles, p.label, p.label, p.name)),
    ...products.map((p) => row('product', 'Br', p.brominated, p.label, p.label, p.brominatedName)),
  ]
}

/** The names the editor sends with the windows: one per product row, empty for "no name of its own". */
export function draftProductNames(drafts: readonly WindowDraft[]): Array<{ productSmiles: string, name: string }> {
  return drafts
    .filter((d) => d.kind === 'product' && d.productSmiles)
    .map((d) => ({ productSmiles: d.productSmiles!, name: d.name.trim() }))
}

/** A row counts as a window once either end is filled in. */
export const draftIsSet = (d: Pick<WindowDraft, 'rtMin' | 'rtMax'>) => d.rtMin !== null || d.rtMax !== null
