// From an uploaded GC file to a result: read it (peak table or raw trace), assign peaks to
// products, turn areas into mole %, compute per-H reactivities and class factors, and flag
// what a student or TA should look at. Pure: the server runs it on the stored original file.
import { assignPeaks, detectPeaks, parsePeakTable, parseTrace, sniffUpload, type Flag, type Peak } from './chromatography'
import { analyzeSubstrate, predictDistribution, relativeReactivities, type CarbonClass } from './halogenation'
import { positionLetter } from './depiction'
import type { RunSource } from './lib/upload-content'

export type Severity = 'info' | 'warning' | 'danger'

export interface RunFlag {
  code: string
  severity: Severity
  message: string
}

export interface RunProduct {
  smiles: string
  hydrogens: number
  carbonClass: CarbonClass
}

export interface RunInput {
  /** The file as text (a peak table or a trace); `source` instead when another reader made peaks or a trace. */
  text?: string
  source?: RunSource
  products: RunProduct[]
  windows: Array<{ productSmiles: string, rtMin: number, rtMax: number, responseFactor: number }>
  solvent?: { rtMin: number, rtMax: number } | null
  startingMaterial?: { rtMin: number, rtMax: number, responseFactor?: number } | null
  /** Predicted mole % per product for the practical's method. */
  predicted: Array<{ smiles: string, percent: number }>
  /** The method's class factors (per-H reactivity relative to primary). */
  literature: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
  /** A key factor further than this multiple from the literature value is flagged. Default 2. */
  farFactor?: number
}

export interface RowProblem { row: number, message: string }

export interface RunResult {
  kind: 'peak-table' | 'trace'
  /** Peaks as read from the table, or as detected in the trace (minutes). */
  peaks: Array<Peak & { assignedTo: string | null }>
  warnings: string[]
  molePercents: Array<{ smiles: string, percent: number }>
  factors: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
  relative: Array<{ smiles: string, relativeReactivity: number | null }>
  conversion: number | null
  unassignedPercent: number
  flags: RunFlag[]
}

/** The file could not be read: row-level problems for the 4xx answer. */
export class RunInputError extends Error {
  constructor(message: string, readonly rows: RowProblem[] = []) {
    super(message)
    this.name = 'RunInputError'
  }
}

const SEVERITY: Record<Flag['severity'], Severity> = { error: 'danger', warning: 'warning', info: 'info' }
const RANK: Record<Severity, number> = { info: 0, warning: 1, danger: 2 }

/** 2 when a flag should stop acceptance, 1 for a warning, 0 when clean (info only). */
export function attentionOf(flags: RunFlag[]): number {
  return flags.reduce((max, f) => Math.max(max, RANK[f.severity]), 0)
}

/** The factor a practical is about: 3°:1° when the substrate has a tertiary C–H, else 2°:1°. */
export function keyFactorOf(products: RunProduct[]): 'tertiaryToPrimary' | 'secondaryToPrimary' {
  return products.some((p) => p.carbonClass === 'tertiary') ? 'tertiaryToPrimary' : 'secondaryToPrimary'
}

function readPeaks(source: RunSource, expectedMaxMinutes: number | undefined): { kind: RunResult['kind'], peaks: Peak[], warnings: string[], flags: RunFlag[] } {
  const integrate = (time: ArrayLike<number>, signal: ArrayLike<number>, warnings: string[]) => {
    const detected = detectPeaks({ time, signal })
    const flags = detected.flags.map((f) => ({ code: f.code, severity: SEVERITY[f.severity === 'warning' ? 'warning' : 'info'], message: f.message }))
    return { kind: 'trace' as const, peaks: detected.peaks.map(({ retentionTime, area, height }) => ({ retentionTime, area, height })), warnings, flags }
  }
  if (source.kind === 'trace') return integrate(source.time, source.signal, source.warnings ?? [])
  if (source.kind === 'peaks') return { kind: 'peak-table', peaks: source.peaks, warnings: source.warnings ?? [], flags: [] }
  const { text } = source
  const sniff = sniffUpload(text)
  if (sniff.kind === 'trace') {
    const trace = parseTrace(text, { expectedMaxMinutes })
    if (trace.errors.length) throw new RunInputError(`The trace has ${trace.errors.length} unreadable row(s)`, trace.errors)
    return integrate(trace.time, trace.signal, [...source.warnings ?? [], ...trace.warnings])
  }
  if (sniff.kind === 'unknown') throw new RunInputError(`This is neither a peak table nor a detector trace: ${sniff.reason}`)
  const table = parsePeakTable(text, { expectedMaxMinutes })
  if (table.errors.length) {
    const first = table.errors[0]!
    throw new RunInputError(first.message, table.errors)
  }
  return { kind: 'peak-table', peaks: table.peaks, warnings: [...source.warnings ?? [], ...table.warnings], flags: [] }
}

/**
 * Solvent or unreacted substrate integrated as a product leaves its own window empty and makes
 * one product far larger than the method predicts; both together are the signature.
 */
function countedAsProduct(input: RunInput, assigned: ReturnType<typeof assignPeaks>, molePercents: RunResult['molePercents']): RunFlag[] {
  const flags: RunFlag[] = []
  // Far above the prediction: more than half of the way from the predicted share to 100 %.
  const suspects = molePercents.filter((m) => {
    const predicted = input.predicted.find((p) => p.smiles === m.smiles)?.percent ?? 0
    return m.percent - predicted > 0.5 * (100 - predicted)
  })
  if (!suspects.length) return flags
  const emptySolvent = input.solvent && assigned.solvent && assigned.solvent.peaks.length === 0
  const emptyStart = input.startingMaterial && assigned.startingMaterial && assigned.startingMaterial.peaks.length === 0
  if (emptySolvent || emptyStart) {
    const what = emptySolvent ? 'solvent' : 'starting material'
    flags.push({
      code: emptySolvent ? 'solvent-counted' : 'starting-material-counted',
      severity: 'danger',
      message: `The ${what} peak seems to be counted as a product: nothing came out in the ${what} window, and ${suspects.map((s) => `${s.smiles} (${s.percent.toFixed(1)} %)`).join(', ')} is far above the prediction. Check which peak is the ${what} and integrate again.`,
    })
  }
  return flags
}

function farFromPrediction(input: RunInput, factors: RunResult['factors']): RunFlag[] {
  const key = keyFactorOf(input.products)
  const observed = factors[key]
  const expected = input.literature[key]
  const limit = input.farFactor ?? 2
  if (observed === null || expected === null || !(expected > 0)) return []
  if (observed > 0 && Math.abs(Math.log(observed / expected)) <= Math.log(limit)) return []
  const name = key === 'tertiaryToPrimary' ? '3°:1°' : '2°:1°'
  return [{
    code: 'far-from-prediction',
    severity: 'warning',
    message: `Your ${name} selectivity of ${observed.toFixed(2)} is more than ${limit}× away from the expected ${expected.toFixed(2)}. Check the peak assignment against the retention windows before you confirm.`,
  }]
}

export function evaluateRun(input: RunInput): RunResult {
  // The last window's end tells seconds from minutes when a file does not say (a 65 s peak is not a 65 min one).
  const ends = [...input.windows.map(w => w.rtMax), input.solvent?.rtMax ?? 0, input.startingMaterial?.rtMax ?? 0]
  const expectedMaxMinutes = input.windows.length ? Math.max(...ends) : undefined
  const { kind, peaks, warnings, flags: readFlags } = readPeaks(input.source ?? { kind: 'text', text: input.text ?? '' }, expectedMaxMinutes)
  if (!peaks.length) throw new RunInputError('No peaks were found in the file')
  const assigned = assignPeaks(peaks, input.windows, {
    solvent: input.solvent ?? undefined,
    startingMaterial: input.startingMaterial ?? undefined,
  })
  const molePercents = assigned.molePercents.map((m) => ({ smiles: m.smiles, percent: m.percent ?? 0 }))
  const anyProduct = molePercents.some((m) => m.percent > 0)
  const reactivity = anyProduct
    ? relativeReactivities({ products: input.products.map((p) => ({ ...p, atoms: [] })) }, molePercents)
    : null
  // A factor is a finite number or null: Infinity or NaN would poison the class statistics.
  const finiteFactor = (v: number | null | undefined) => (typeof v === 'number' && Number.isFinite(v) ? v : null)
  const factors = { secondaryToPrimary: finiteFactor(reactivity?.factors.secondaryToPrimary), tertiaryToPrimary: finiteFactor(reactivity?.factors.tertiaryToPrimary) }
  const engineFlags: RunFlag[] = assigned.flags.map((f) => ({ code: f.code, severity: SEVERITY[f.severity], message: f.message }))
  const flags = [...readFlags, ...engineFlags, ...countedAsProduct(input, assigned, molePercents), ...farFromPrediction(input, factors)]
  // Peaks are matched by value: the engine may hand back copies.
  const keyOf = (p: Peak) => `${p.retentionTime}|${p.area}`
  const owner = new Map<string, string>()
  for (const p of assigned.products) for (const peak of p.peaks) owner.set(keyOf(peak), p.smiles)
  for (const peak of assigned.solvent?.peaks ?? []) owner.set(keyOf(peak), 'solvent')
  for (const peak of assigned.startingMaterial?.peaks ?? []) owner.set(keyOf(peak), 'starting-material')
  return {
    kind,
    peaks: peaks.map((p) => ({ ...p, assignedTo: owner.get(keyOf(p)) ?? null })),
    warnings,
    molePercents,
    factors,
    relative: reactivity?.products.map((p) => ({ smiles: p.smiles, relativeReactivity: p.relativeReactivity })) ?? [],
    conversion: assigned.conversion,
    unassignedPercent: assigned.unassignedPercent,
    flags,
  }
}


export interface PracticalChemistry {
  products: Array<RunProduct & { label: string }>
  windows: RunInput['windows']
  solvent: RunInput['solvent']
  startingMaterial: RunInput['startingMaterial']
  predicted: Array<{ smiles: string, percent: number }>
  statistical: Array<{ smiles: string, percent: number }>
  literature: RunInput['literature']
  keyFactor: 'secondaryToPrimary' | 'tertiaryToPrimary'
}

export interface WindowRow {
  kind: 'product' | 'solvent' | 'starting-material'
  productSmiles: string | null
  rtMin: number
  rtMax: number
  responseFactor: number
}

export interface MethodFactors {
  halogen: 'Cl' | 'Br'
  rPrimary: number
  rSecondary: number
  rTertiary: number
}

/**
 * What a practical's results are computed against: the substrate's products for the method's
 * halogen (lettered as in the depiction), the retention windows of those products, and the
 * method's prediction and class factors.
 */
export function practicalChemistryOf(substrateSmiles: string, method: MethodFactors, windowRows: WindowRow[]): PracticalChemistry {
  const analysis = analyzeSubstrate(substrateSmiles, { halogen: method.halogen })
  const predicted = predictDistribution(analysis, { primary: method.rPrimary, secondary: method.rSecondary, tertiary: method.rTertiary })
  const totalH = analysis.products.reduce((n, p) => n + p.hydrogens, 0)
  const productSet = new Set(analysis.products.map((p) => p.smiles))
  const has = (cls: CarbonClass) => analysis.products.some((p) => p.carbonClass === cls)
  const reference = (kind: 'solvent' | 'starting-material') => {
    const w = windowRows.find((r) => r.kind === kind)
    return w ? { rtMin: w.rtMin, rtMax: w.rtMax, responseFactor: w.responseFactor } : null
  }
  return {
    products: analysis.products.map((p, i) => ({ smiles: p.smiles, label: positionLetter(i), hydrogens: p.hydrogens, carbonClass: p.carbonClass })),
    windows: windowRows.filter((r) => r.kind === 'product' && r.productSmiles && productSet.has(r.productSmiles))
      .map((r) => ({ productSmiles: r.productSmiles!, rtMin: r.rtMin, rtMax: r.rtMax, responseFactor: r.responseFactor })),
    solvent: reference('solvent'),
    startingMaterial: reference('starting-material'),
    predicted: predicted.map((p) => ({ smiles: p.smiles, percent: p.percent })),
    statistical: analysis.products.map((p) => ({ smiles: p.smiles, percent: (p.hydrogens / totalH) * 100 })),
    literature: {
      secondaryToPrimary: has('secondary') ? method.rSecondary / method.rPrimary : null,
      tertiaryToPrimary: has('tertiary') ? method.rTertiary / method.rPrimary : null,
    },
    keyFactor: keyFactorOf(analysis.products),
  }
}
