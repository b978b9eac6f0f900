// GC results to mole fractions: peak tables and raw traces in, products' mole % and flags out.
// Method: PRODUCT.md, "GC peak tables → mole fractions". Pure: no I/O, no clock.
import { MAX_PEAK_AREA, MAX_RETENTION_MINUTES, peakWith, type Peak, type RowError } from './lib/peak-table'
import { DEFAULT_DRIFT_TOLERANCE, driftFlags, rescueDriftedPeaks, type DriftSlot, type DriftTolerance } from './lib/retention-drift'

export { parsePeakTable, MAX_PEAK_ROWS, SECONDS_THRESHOLD, MAX_PEAK_AREA, MAX_RETENTION_MINUTES } from './lib/peak-table'
export type { Peak, RowError, ParseErrorCode, ParsedPeakTable, PeakTableOptions, TableMeta } from './lib/peak-table'
export { parseTrace, sniffUpload, MIN_TRACE_POINTS, MAX_TRACE_POINTS } from './lib/trace-table'
export type { ParsedTrace, TraceOptions, UploadSniff } from './lib/trace-table'
export { detectPeaks, TraceError } from './lib/peak-detection'
export type { DetectedPeak, DetectPeaksOptions, DetectPeaksResult, Trace } from './lib/peak-detection'
export { DEFAULT_DRIFT_TOLERANCE, driftReach } from './lib/retention-drift'
export type { DriftTolerance } from './lib/retention-drift'

export interface ProductWindow {
  productSmiles: string
  /** The product's name for messages ("1,3-dichlorobutane"); the SMILES is shown beside it. */
  name?: string | null
  rtMin: number
  rtMax: number
  /** Relative response factor; corrected area = area / responseFactor. Default 1. */
  responseFactor?: number
}

export interface ReferenceWindow {
  rtMin: number
  rtMax: number
  responseFactor?: number
}

export interface AssignOptions {
  solvent?: ReferenceWindow
  startingMaterial?: ReferenceWindow
  /** Unassigned area (percent of all non-solvent area) above which a flag is raised. */
  unassignedThresholdPercent?: number
  /** Share of a window's width at each edge where a peak counts as drifting. */
  edgeFraction?: number
  /** How far outside an empty product window a lone peak is still taken as that product, drifted. */
  driftTolerance?: Partial<DriftTolerance>
  /** Allowed deviation of the area % column's sum from 100. */
  areaPercentTolerance?: number
}

export type FlagCode =
  | 'missing-product' | 'split-peak' | 'unassigned-area' | 'area-percent-sum' | 'retention-drift'
  | 'negative-value' | 'non-numeric' | 'no-product-peaks' | 'missing-solvent' | 'missing-starting-material'
  | 'overlapping-windows' | 'overlap' | 'parse-error' | 'out-of-range'

export interface Flag {
  code: FlagCode
  message: string
  severity: 'error' | 'warning' | 'info'
  productSmiles?: string
  retentionTimes?: number[]
}

export interface AssignedProduct {
  smiles: string
  /** Mole percent over product peaks; null when no product area was found at all. */
  percent: number | null
  area: number
  correctedArea: number
  responseFactor: number
  /** Retention time of the largest peak in the window, null when the window is empty. */
  retentionTime: number | null
  peaks: Peak[]
  /** Minutes outside the window of a peak taken as drifted (+ later, − earlier); null when none was. */
  driftMinutes: number | null
}

export interface ReferencePeakGroup {
  area: number
  correctedArea: number | null
  peaks: Peak[]
}

export interface AssignmentResult {
  molePercents: { smiles: string, percent: number | null }[]
  products: AssignedProduct[]
  solvent: ReferencePeakGroup | null
  startingMaterial: ReferencePeakGroup | null
  unassigned: (Peak & { percentOfTotal: number })[]
  /** Percent of all non-solvent area that fell in no window. */
  unassignedPercent: number
  /** Percent of starting material converted to products, when it has a window and response factor. */
  conversion: number | null
  flags: Flag[]
}

/** Window definitions that cannot be used (a configuration mistake, not a student's). */
export class WindowError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'WindowError'
  }
}

const fmt = (t: number) => t.toFixed(2)

function checkWindow(w: ReferenceWindow, what: string): void {
  if (!Number.isFinite(w?.rtMin) || !Number.isFinite(w?.rtMax) || w.rtMin < 0 || w.rtMin >= w.rtMax) {
    throw new WindowError(`The retention-time window for ${what} must have 0 ≤ start < end (minutes).`)
  }
  if (w.responseFactor !== undefined && (!Number.isFinite(w.responseFactor) || w.responseFactor <= 0)) {
    throw new WindowError(`The response factor for ${what} must be a positive number.`)
  }
}

type Slot = DriftSlot

/** "1,3-dichlorobutane (CC(Cl)CCCl)" when the window names its product, else the SMILES alone. */
export function windowProductLabel(w: Pick<ProductWindow, 'productSmiles' | 'name'>): string {
  return w.name ? `${w.name} (${w.productSmiles})` : w.productSmiles
}

/**
 * The windows' ends as objects of one shape: the windows themselves come in several (product,
 * solvent, starting material, with or without names), and reading their ends for each of
 * thousands of peaks went through every shape each time.
 */
function boundsOf(windows: ReadonlyArray<{ window: { rtMin: number, rtMax: number } }>): Bounds[] {
  return windows.map(({ window: w }) => ({ rtMin: w.rtMin, rtMax: w.rtMax }))
}

interface Bounds { rtMin: number, rtMax: number }

/**
 * The index of the window holding rt whose centre is closest (the first of equals), -1 when
 * none does; `ambiguous` when more than one does. A loop rather than filter and sort: it runs
 * once for each of thousands of peaks.
 */
function pickSlot(rt: number, bounds: readonly Bounds[]): { index: number, ambiguous: boolean } {
  let best = -1
  let bestDistance = 0
  let inside = 0
  for (let k = 0; k < bounds.length; k++) {
    const b = bounds[k]!
    if (!(rt >= b.rtMin && rt <= b.rtMax)) continue
    inside++
    const distance = Math.abs(rt - (b.rtMin + b.rtMax) / 2)
    if (best < 0 || distance < bestDistance) { best = k; bestDistance = distance }
  }
  return { index: best, ambiguous: inside > 1 }
}

/** Whether any window holds rt: most peaks of a long table are in none, and need no more than this. */
function inAnyWindow(rt: number, bounds: readonly Bounds[]): boolean {
  for (let k = 0; k < bounds.length; k++) if (rt >= bounds[k]!.rtMin && rt <= bounds[k]!.rtMax) return true
  return false
}

function validPeaks(peaks: Peak[], flags: Flag[]): Peak[] {
  return peaks.filter((p, i) => {
    // The usual peak, checked without building the message that names it.
    if (p && typeof p.area === 'number' && typeof p.retentionTime === 'number' && p.area >= 0 && p.retentionTime >= 0
      && p.area <= MAX_PEAK_AREA && p.retentionTime <= MAX_RETENTION_MINUTES) return true
    const where = p.row ? `row ${p.row}` : `peak ${i + 1}`
    if (!Number.isFinite(p?.retentionTime) || !Number.isFinite(p?.area)) {
      flags.push({
        code: 'non-numeric',
        severity: 'error',
        message: `The retention time or area of ${where} is not a number; that peak was left out.`,
      })
      return false
    }
    if (p.area < 0 || p.retentionTime < 0) {
      flags.push({
        code: 'negative-value',
        severity: 'error',
        retentionTimes: [p.retentionTime],
        message: `The ${p.area < 0 ? 'area' : 'retention time'} of ${where} is negative; re-integrate that peak. It was left out.`,
      })
      return false
    }
    if (p.area > MAX_PEAK_AREA || p.retentionTime > MAX_RETENTION_MINUTES) {
      const what = p.area > MAX_PEAK_AREA ? 'area is above 1e15' : `retention time is above ${MAX_RETENTION_MINUTES / 60} hours`
      flags.push({
        code: 'out-of-range',
        severity: 'error',
        message: `The ${what} at ${where}, beyond any real measurement; that peak was left out.`,
      })
      return false
    }
    return true
  })
}

// Areas passed validPeaks are at most MAX_PEAK_AREA each, so a sum of any array of them is finite.
const sumArea = (peaks: Peak[]) => peaks.reduce((s, p) => s + p.area, 0)

/**
 * Percent shares of non-negative values. The plain sum is used when it is finite, else the
 * values are scaled by the largest first. An infinite value (an area divided by a response
 * factor near zero) has lost its size, so then no share is given rather than a guessed one.
 */
function sharesOf(values: number[]): (number | null)[] {
  const total = values.reduce((s, v) => s + v, 0)
  if (Number.isFinite(total)) return values.map((v) => (total > 0 ? (v / total) * 100 : null))
  if (values.every(Number.isFinite)) {
    const max = Math.max(...values)
    const scaled = values.reduce((s, v) => s + v / max, 0)
    return values.map((v) => (v / max / scaled) * 100)
  }
  return values.map(() => null)
}

/**
 * Assigns peaks to products by retention-time window, divides by response factors and
 * normalises over product peaks only. Solvent, starting material and unassigned peaks are
 * reported but never enter the mole %.
 */
export function assignPeaks(peaks: Peak[], windows: ProductWindow[], options: AssignOptions = {}): AssignmentResult {
  validateWindows(windows, options)
  const flags: Flag[] = []
  const usable = validPeaks(Array.isArray(peaks) ? peaks : [], flags)
  const { slots, unassigned: outside } = distribute(usable, windows, options, flags)
  const drift = rescueDriftedPeaks(slots, outside, { ...DEFAULT_DRIFT_TOLERANCE, ...options.driftTolerance })
  const unassigned = drift.unassigned
  const products = productResults(slots.slice(0, windows.length), windows, flags)
  for (const d of drift.drifted) products.find((p) => p.smiles === d.slot.productSmiles)!.driftMinutes = d.minutes
  const productTotal = products.reduce((s, p) => s + p.correctedArea, 0)
  const group = (key: string, rf: number | undefined): ReferencePeakGroup | null => {
    const slot = slots.find((x) => x.key === key)
    return slot ? { area: sumArea(slot.peaks), correctedArea: rf ? sumArea(slot.peaks) / rf : null, peaks: slot.peaks } : null
  }
  const solvent = group('solvent', options.solvent?.responseFactor)
  const startingMaterial = group('sm', options.startingMaterial?.responseFactor)
  if (solvent && solvent.peaks.length === 0) {
    const range = `${fmt(options.solvent!.rtMin)}–${fmt(options.solvent!.rtMax)} min`
    flags.push({
      code: 'missing-solvent',
      severity: 'info',
      message: `No solvent peak was found (${range}); if solvent was injected, make sure its peak has not been counted as a product.`,
    })
  }
  if (startingMaterial && startingMaterial.peaks.length === 0) {
    flags.push({
      code: 'missing-starting-material',
      severity: 'info',
      message: 'No starting-material peak was found, so the conversion cannot be given.',
    })
  }
  // The solvent dwarfs everything else, so unassigned area is judged against the rest.
  const nonSolvent = sumArea(usable) - (solvent?.area ?? 0)
  const unassignedPercent = nonSolvent > 0 ? (sumArea(unassigned) / nonSolvent) * 100 : 0
  const threshold = options.unassignedThresholdPercent ?? 5
  if (unassignedPercent > threshold) {
    flags.push({
      code: 'unassigned-area',
      severity: 'warning',
      retentionTimes: unassigned.map((p) => p.retentionTime),
      message: `${unassignedPercent.toFixed(1)} % of the peak area (solvent excluded) is in no window (limit ${threshold} %); `
        + 'look for products of a second halogenation, impurities or drifted peaks.',
    })
  }
  flags.push(...areaPercentFlags(usable, options.areaPercentTolerance ?? 0.5))
  flags.push(...driftFlags(slots, drift, options.edgeFraction ?? 0.1))
  // Mole-based: each product molecule came from one substrate molecule.
  const smCorrected = startingMaterial?.peaks.length ? startingMaterial.correctedArea : null
  const converted = smCorrected !== null && productTotal > 0 ? (productTotal / (productTotal + smCorrected)) * 100 : null
  const conversion = converted !== null && Number.isFinite(converted) ? converted : null
  return {
    molePercents: products.map((p) => ({ smiles: p.smiles, percent: p.percent })),
    products,
    solvent,
    startingMaterial,
    unassigned: unassigned.map((p) => peakWith(p, 'percentOfTotal', nonSolvent > 0 ? (p.area / nonSolvent) * 100 : 0)),
    unassignedPercent,
    conversion,
    flags,
  }
}

function validateWindows(windows: ProductWindow[], options: AssignOptions): void {
  if (!Array.isArray(windows) || windows.length === 0) throw new WindowError('At least one product window is needed.')
  const seen = new Set<string>()
  for (const w of windows) {
    checkWindow(w, w?.productSmiles ?? 'a product')
    if (seen.has(w.productSmiles)) throw new WindowError(`${w.productSmiles} has more than one window.`)
    seen.add(w.productSmiles)
  }
  if (options.solvent) checkWindow(options.solvent, 'the solvent')
  if (options.startingMaterial) checkWindow(options.startingMaterial, 'the starting material')
}

function distribute(peaks: Peak[], windows: ProductWindow[], options: AssignOptions, flags: Flag[]) {
  const slots: Slot[] = windows.map((w) => ({
    key: `p:${w.productSmiles}`,
    name: windowProductLabel(w),
    product: true,
    productSmiles: w.productSmiles,
    window: w,
    peaks: [],
  }))
  if (options.solvent) slots.push({ key: 'solvent', name: 'the solvent', product: false, window: options.solvent, peaks: [] })
  if (options.startingMaterial) {
    slots.push({ key: 'sm', name: 'the starting material', product: false, window: options.startingMaterial, peaks: [] })
  }
  const unassigned: Peak[] = []
  const bounds = boundsOf(slots)
  for (const p of peaks) {
    if (!inAnyWindow(p.retentionTime, bounds)) { unassigned.push(p); continue }
    const { index, ambiguous } = pickSlot(p.retentionTime, bounds)
    const slot = slots[index]!
    if (ambiguous) {
      flags.push({
        code: 'overlapping-windows',
        severity: 'info',
        retentionTimes: [p.retentionTime],
        message: `The peak at ${fmt(p.retentionTime)} min falls in more than one window; it was given to the window whose centre is closest.`,
      })
    }
    slot.peaks.push(p)
  }
  return { slots, unassigned }
}

function productResults(slots: Slot[], windows: ProductWindow[], flags: Flag[]): AssignedProduct[] {
  const products: AssignedProduct[] = slots.map((s, i) => {
    const rf = windows[i]!.responseFactor ?? 1
    const area = sumArea(s.peaks)
    const largest = [...s.peaks].sort((a, b) => b.area - a.area)[0]
    return {
      smiles: windows[i]!.productSmiles,
      percent: null,
      area,
      correctedArea: area / rf,
      responseFactor: rf,
      retentionTime: largest?.retentionTime ?? null,
      peaks: s.peaks,
      driftMinutes: null,
    }
  })
  const shares = sharesOf(products.map((p) => p.correctedArea))
  products.forEach((p, i) => { p.percent = shares[i]! })
  const total = products.reduce((s, p) => s + p.correctedArea, 0)
  slots.forEach((s, i) => {
    const w = windows[i]!
    const range = `${fmt(w.rtMin)}–${fmt(w.rtMax)} min`
    if (s.peaks.length === 0) {
      flags.push({
        code: 'missing-product',
        severity: 'warning',
        productSmiles: w.productSmiles,
        message: `No peak was found for ${s.name} (${range}); it was counted as 0 %. If the product formed, check the integration or whether its peak has moved.`,
      })
    } else if (s.peaks.length > 1) {
      flags.push({
        code: 'split-peak',
        severity: 'warning',
        productSmiles: w.productSmiles,
        retentionTimes: s.peaks.map((p) => p.retentionTime),
        message: `${s.peaks.length} peaks fall in the window for ${s.name} (${range}) and their areas were added; if one of them is another compound, re-integrate or ask your TA.`,
      })
    }
  })
  if (total <= 0) {
    flags.push({
      code: 'no-product-peaks',
      severity: 'error',
      message: 'No product peak has any area, so no mole percentages can be given; check that the right file and windows were used.',
    })
  }
  return products
}

function areaPercentFlags(peaks: Peak[], tolerance: number): Flag[] {
  const withPct = peaks.filter((p) => typeof p.areaPercent === 'number' && Number.isFinite(p.areaPercent))
  if (withPct.length === 0) return []
  const sum = withPct.reduce((s, p) => s + p.areaPercent!, 0)
  if (Math.abs(sum - 100) <= tolerance && withPct.length === peaks.length) return []
  const missing = peaks.length - withPct.length
  return [{
    code: 'area-percent-sum',
    severity: 'warning',
    message: `The area % column adds up to ${sum.toFixed(2)} %, not 100 %${missing ? ` (${missing} peaks have no area %)` : ''}; rows may be missing from the exported table.`,
  }]
}

/** Parser row errors as result flags, so a refused table and a flagged one read alike. */
export function flagsFromParseErrors(errors: RowError[]): Flag[] {
  return errors.map((e) => ({
    code: e.code === 'negative-value' || e.code === 'non-numeric' ? e.code : 'parse-error',
    severity: 'error' as const,
    message: e.message,
  }))
}
