// From an uploaded GC file to a result: read it (peak table or raw trace), assign peaks to
// products, turn areas into mole %, compute per-H reactivities and class factors, and flag
// what a student or TA should look at. Pure: the server runs it on the stored original file.
import { assignPeaks, detectPeaks, parsePeakTable, parseTrace, sniffUpload, type Flag, type Peak } from './chromatography'
import { analyzeSubstrate, predictDistribution, relativeReactivities, type CarbonClass, type SubstrateAnalysis } from './halogenation'
import { positionLetter } from './depiction'
import { readerSource } from './source-line'
import type { RunSource } from './lib/upload-content'
import { splitLines } from './lib/table-text'
import { peakWith } from './lib/peak-table'
import { keyFactorOf, type KeyFactor } from './key-factor'
import { KEY_FACTOR_LABELS } from '../types/review'

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
  /** Display name ("1,3-dichlorobutane"); messages show it first with the SMILES beside it. */
  name?: string | null
}

export type ReferenceSourceKind = 'published' | 'from-memory' | 'course-results' | 'other'

/** A measured product distribution for a substrate and reagent, with where it comes from. */
export interface ReferenceDistribution {
  percents: Array<{ smiles: string, percent: number }>
  source: string
  sourceKind: ReferenceSourceKind
}

/**
 * What a run is judged against: the substrate's reference distribution for the reagent when
 * there is one, else the class model (n·r per class), which for a haloalkane ignores what the
 * halogen already on the chain does to its neighbours.
 */
export interface Expectation {
  basis: 'reference' | 'class-model'
  /** mol % per product, summing to 100. */
  percents: Array<{ smiles: string, percent: number }>
  /** The class factors of that distribution (reference) or of the method (class model). */
  factors: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
  /** "the reference distribution from …" or "the class model (1° : 2° : 3° per H) …", to follow "compared with". */
  description: string
  source: string | null
  sourceKind: ReferenceSourceKind | null
  /** The substrate carries a halogen already. */
  substituted: boolean
}

export interface RunInput {
  /** The file as text (a peak table or a trace); `source` instead when another reader made peaks or a trace. */
  text?: string
  source?: RunSource
  products: RunProduct[]
  windows: Array<{ productSmiles: string, rtMin: number, rtMax: number, responseFactor: number, name?: string | null }>
  solvent?: { rtMin: number, rtMax: number } | null
  startingMaterial?: { rtMin: number, rtMax: number, responseFactor?: number } | null
  /** Predicted mole % per product for the practical's method. */
  predicted: Array<{ smiles: string, percent: number }>
  /** The method's class factors (per-H reactivity relative to primary). */
  literature: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
  /** What the run is judged against; without it, the class model from `predicted` and `literature`. */
  expected?: Expectation
  /** Class model: a key factor further than this multiple from the expected value is flagged. Default 2. */
  farFactor?: number
  /**
   * Reference distribution: a mixture further than this many percentage points from it (half the
   * sum of |observed − reference|) is flagged. Default 15.
   */
  farPoints?: number
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

function readPeaks(
  source: RunSource,
  expectedMaxMinutes: number | undefined,
): { kind: RunResult['kind'], peaks: Peak[], warnings: string[], flags: RunFlag[] } {
  const integrate = (time: ArrayLike<number>, signal: ArrayLike<number>, warnings: string[]) => {
    const detected = detectPeaks({ time, signal })
    const flags = detected.flags.map((f) => ({
      code: f.code,
      severity: SEVERITY[f.severity === 'warning' ? 'warning' : 'info'],
      message: f.message,
    }))
    const peaks = detected.peaks.map(({ retentionTime, area, height }) => ({ retentionTime, area, height }))
    return { kind: 'trace' as const, peaks, warnings, flags }
  }
  if (source.kind === 'trace') return integrate(source.time, source.signal, source.warnings ?? [])
  if (source.kind === 'peaks') return { kind: 'peak-table', peaks: source.peaks, warnings: source.warnings ?? [], flags: [] }
  const { text } = source
  // Split once: the sniff and the reader look at the same lines.
  const lines = typeof text === 'string' ? splitLines(text) : undefined
  const sniff = sniffUpload(text, lines)
  if (sniff.kind === 'trace') {
    const trace = parseTrace(text, { expectedMaxMinutes }, lines)
    if (trace.errors.length) throw new RunInputError(`The trace has ${trace.errors.length} unreadable row(s)`, trace.errors)
    return integrate(trace.time, trace.signal, [...source.warnings ?? [], ...trace.warnings])
  }
  if (sniff.kind === 'unknown') throw new RunInputError(`This is neither a peak table nor a detector trace: ${sniff.reason}`)
  const table = parsePeakTable(text, { expectedMaxMinutes }, lines)
  if (table.errors.length) {
    const first = table.errors[0]!
    throw new RunInputError(first.message, table.errors)
  }
  return { kind: 'peak-table', peaks: table.peaks, warnings: [...source.warnings ?? [], ...table.warnings], flags: [] }
}

/** "1,3-dichlorobutane (CC(Cl)CCCl)", or the SMILES alone when the product has no name. */
export function productLabelOf(products: ReadonlyArray<Pick<RunProduct, 'smiles' | 'name'>>, smiles: string): string {
  const name = products.find((p) => p.smiles === smiles)?.name
  return name ? `${name} (${smiles})` : smiles
}

const CLASS_MODEL = 'the class model (1° : 2° : 3° per H)'

/** The class model's expectation, for runs given no reference distribution. */
export function classModelExpectation(input: Pick<RunInput, 'predicted' | 'literature'>, substituted: boolean): Expectation {
  return {
    basis: 'class-model',
    percents: input.predicted,
    factors: input.literature,
    description: substituted ? `${CLASS_MODEL}, which ignores the substituent's effect` : CLASS_MODEL,
    source: null,
    sourceKind: null,
    substituted,
  }
}

const expectationOf = (input: RunInput): Expectation => input.expected ?? classModelExpectation(input, false)

/**
 * Solvent or unreacted substrate integrated as a product leaves its own window empty and makes
 * one product far larger than expected; both together are the signature.
 */
function countedAsProduct(input: RunInput, assigned: ReturnType<typeof assignPeaks>, molePercents: RunResult['molePercents']): RunFlag[] {
  const flags: RunFlag[] = []
  const expected = expectationOf(input).percents
  // Far above the expectation: more than half of the way from the expected share to 100 %.
  const suspects = molePercents.filter((m) => {
    const share = expected.find((p) => p.smiles === m.smiles)?.percent ?? 0
    return m.percent - share > 0.5 * (100 - share)
  })
  if (!suspects.length) return flags
  const emptySolvent = input.solvent && assigned.solvent && assigned.solvent.peaks.length === 0
  const emptyStart = input.startingMaterial && assigned.startingMaterial && assigned.startingMaterial.peaks.length === 0
  if (emptySolvent || emptyStart) {
    const what = emptySolvent ? 'solvent' : 'starting material'
    flags.push({
      code: emptySolvent ? 'solvent-counted' : 'starting-material-counted',
      severity: 'danger',
      message: `The ${what} peak seems to be counted as a product: nothing came out in the ${what} window, and ${suspects.map((s) => `${productLabelOf(input.products, s.smiles)} at ${s.percent.toFixed(1)} %`).join(', ')} is far above the expected share. Check which peak is the ${what} and integrate again.`,
    })
  }
  return flags
}

const CHECK_ASSIGNMENT = 'Check the peak assignment against the retention windows before you confirm.'

/**
 * Against a reference distribution the whole mixture is compared (swapped peaks change it even
 * when the pooled class factor stays put); against the class model, the key factor.
 */
function farFromPrediction(input: RunInput, factors: RunResult['factors'], molePercents: RunResult['molePercents']): RunFlag[] {
  const expected = expectationOf(input)
  if (expected.basis === 'reference') {
    const gaps = expected.percents.map((e) => ({
      smiles: e.smiles,
      expected: e.percent,
      observed: molePercents.find((m) => m.smiles === e.smiles)?.percent ?? 0,
    }))
    const distance = gaps.reduce((sum, g) => sum + Math.abs(g.observed - g.expected), 0) / 2
    const limit = input.farPoints ?? 15
    if (!molePercents.some((m) => m.percent > 0) || distance <= limit) return []
    const worst = [...gaps].sort((a, b) => Math.abs(b.observed - b.expected) - Math.abs(a.observed - a.expected))[0]!
    return [{
      code: 'far-from-prediction',
      severity: 'warning',
      message: `Your product mixture is ${distance.toFixed(1)} percentage points away from ${expected.description} (limit ${limit}); the largest gap is ${productLabelOf(input.products, worst.smiles)}: ${worst.observed.toFixed(1)} % against ${worst.expected.toFixed(1)} %. ${CHECK_ASSIGNMENT}`,
    }]
  }
  const key = keyFactorOf(input.products)
  const observed = factors[key]
  const value = expected.factors[key]
  const limit = input.farFactor ?? 2
  if (observed === null || value === null || !(value > 0)) return []
  if (observed > 0 && Math.abs(Math.log(observed / value)) <= Math.log(limit)) return []
  const name = KEY_FACTOR_LABELS[key]
  const modelCaveat = ' That value comes from the class model, which ignores the effect of the halogen already on the substrate, so treat it as a rough guide.'
  const caveat = expected.substituted ? modelCaveat : ''
  return [{
    code: 'far-from-prediction',
    severity: 'warning',
    message: `Your ${name} selectivity of ${observed.toFixed(2)} is more than ${limit}× away from the expected ${value.toFixed(2)}.${caveat} ${CHECK_ASSIGNMENT}`,
  }]
}

/**
 * peakWith(p, 'assignedTo', who), with the usual shape of a table's peak (time, area, row) made
 * by one literal: thousands of them, each built field by field, were a tenth of a long table's run.
 */
function withOwner(p: Peak, assignedTo: string | null): Peak & { assignedTo: string | null } {
  if (p.areaPercent === undefined && p.height === undefined && p.row !== undefined) {
    return { retentionTime: p.retentionTime, area: p.area, row: p.row, assignedTo }
  }
  return peakWith(p, 'assignedTo', assignedTo)
}

export function evaluateRun(input: RunInput): RunResult {
  // The last window's end tells seconds from minutes when a file does not say (a 65 s peak is not a 65 min one).
  const ends = [...input.windows.map((w) => w.rtMax), input.solvent?.rtMax ?? 0, input.startingMaterial?.rtMax ?? 0]
  const expectedMaxMinutes = input.windows.length ? Math.max(...ends) : undefined
  const source: RunSource = input.source ?? { kind: 'text', text: input.text ?? '' }
  const { kind, peaks, warnings, flags: readFlags } = readPeaks(source, expectedMaxMinutes)
  if (!peaks.length) throw new RunInputError('No peaks were found in the file')
  const named = input.windows.map((w) => ({ ...w, name: w.name ?? input.products.find((p) => p.smiles === w.productSmiles)?.name ?? null }))
  const assigned = assignPeaks(peaks, named, {
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
  const factors = {
    secondaryToPrimary: finiteFactor(reactivity?.factors.secondaryToPrimary),
    tertiaryToPrimary: finiteFactor(reactivity?.factors.tertiaryToPrimary),
  }
  const engineFlags: RunFlag[] = assigned.flags.map((f) => ({ code: f.code, severity: SEVERITY[f.severity], message: f.message }))
  const flags = [
    ...readFlags,
    ...engineFlags,
    ...countedAsProduct(input, assigned, molePercents),
    ...farFromPrediction(input, factors, molePercents),
  ]
  // Peaks are matched by value (the engine may hand back copies): retention time, then area, as
  // numbers (writing thousands of them out as text was a good part of a large table's time).
  const owner = new Map<number, Map<number, string>>()
  const own = (peak: Peak, who: string) => {
    const byArea = owner.get(peak.retentionTime) ?? new Map<number, string>()
    owner.set(peak.retentionTime, byArea.set(peak.area, who))
  }
  for (const p of assigned.products) for (const peak of p.peaks) own(peak, p.smiles)
  for (const peak of assigned.solvent?.peaks ?? []) own(peak, 'solvent')
  for (const peak of assigned.startingMaterial?.peaks ?? []) own(peak, 'starting-material')
  return {
    kind,
    peaks: peaks.map((p) => withOwner(p, owner.get(p.retentionTime)?.get(p.area) ?? null)),
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
  products: Array<RunProduct & { label: string, name: string | null }>
  windows: RunInput['windows']
  solvent: RunInput['solvent']
  startingMaterial: RunInput['startingMaterial']
  predicted: Array<{ smiles: string, percent: number }>
  statistical: Array<{ smiles: string, percent: number }>
  literature: RunInput['literature']
  keyFactor: KeyFactor
  /** What runs are judged against: the reference distribution when there is one, else the class model. */
  expected: Expectation
  /** What the products are ("monochlorides", "dichlorides"), for wording the conversion. */
  productKind: string
  /** The method's literature factors as a reference ("Chlorine and light at 25 °C: …"); set by the server's loader. */
  literatureSource?: string
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

export interface PracticalExtras {
  /** A product's display name by its canonical SMILES (the caller resolves stored and built-in names). */
  nameOf?: (canonicalSmiles: string) => string | null
  /** The substrate's reference distribution for the method's reagent, if it has one. */
  reference?: ReferenceDistribution | null
  /** The substrate's analysis for the method's halogen, when the caller has it already. */
  analysis?: Pick<SubstrateAnalysis, 'products'>
}

const MULTIPLIER = ['', 'mono', 'di', 'tri', 'tetra']

/**
 * What one more halogen makes of the substrate: monochlorides from an alkane, dichlorides from a
 * chloroalkane chlorinated, bromochloro compounds from one brominated.
 */
export function productKindWord(substrateSmiles: string, halogen: 'Cl' | 'Br'): string {
  const count = (x: RegExp) => (substrateSmiles.match(x) ?? []).length
  const cl = count(/Cl/g) + (halogen === 'Cl' ? 1 : 0)
  const br = count(/Br/g) + (halogen === 'Br' ? 1 : 0)
  const others = count(/F|I/g)
  const total = cl + br + others
  if (total === cl && total < MULTIPLIER.length) return `${MULTIPLIER[total]}chlorides`
  if (total === br && total < MULTIPLIER.length) return `${MULTIPLIER[total]}bromides`
  if (others === 0 && cl === 1 && br === 1) return 'bromochloro compounds'
  return 'polyhalogenated products'
}

/** A halogen already on the substrate (a haloalkane): the class model does not see its effect. */
export const isSubstituted = (smiles: string) => /Cl|Br|F|I/.test(smiles)

/**
 * The reference distribution over the substrate's products (missing ones at 0 %), normalised to
 * 100, with the class factors it implies; null when it covers none of the products.
 */
export function referenceExpectation(
  analysis: { products: Array<RunProduct & { atoms?: number[] }> },
  reference: ReferenceDistribution,
  substituted: boolean,
): Expectation | null {
  const raw = analysis.products.map((p) => ({
    smiles: p.smiles,
    percent: Math.max(0, reference.percents.find((r) => r.smiles === p.smiles)?.percent ?? 0),
  }))
  const total = raw.reduce((sum, r) => sum + r.percent, 0)
  if (!(total > 0) || !Number.isFinite(total)) return null
  const percents = raw.map((r) => ({ smiles: r.smiles, percent: (r.percent / total) * 100 }))
  const { factors } = relativeReactivities({ products: analysis.products.map((p) => ({ ...p, atoms: p.atoms ?? [] })) }, percents)
  return {
    basis: 'reference',
    percents,
    factors,
    // Read by students: the reference itself; whether it was recalled is the library's note (sourceKind).
    description: `the reference distribution from ${readerSource(reference.source)}`,
    source: reference.source,
    sourceKind: reference.sourceKind,
    substituted,
  }
}

/**
 * What a practical's results are computed against: the substrate's products for the method's
 * halogen (lettered as in the depiction, named when a name is known), the retention windows of
 * those products, the method's prediction and class factors, and the expectation runs are
 * judged against.
 */
export function practicalChemistryOf(
  substrateSmiles: string,
  method: MethodFactors,
  windowRows: WindowRow[],
  extras: PracticalExtras = {},
): PracticalChemistry {
  const analysis = extras.analysis ?? analyzeSubstrate(substrateSmiles, { halogen: method.halogen })
  const predicted = predictDistribution(analysis, { primary: method.rPrimary, secondary: method.rSecondary, tertiary: method.rTertiary })
  const totalH = analysis.products.reduce((n, p) => n + p.hydrogens, 0)
  const productSet = new Set(analysis.products.map((p) => p.smiles))
  const has = (cls: CarbonClass) => analysis.products.some((p) => p.carbonClass === cls)
  const reference = (kind: 'solvent' | 'starting-material') => {
    const w = windowRows.find((r) => r.kind === kind)
    return w ? { rtMin: w.rtMin, rtMax: w.rtMax, responseFactor: w.responseFactor } : null
  }
  const nameOf = (smiles: string) => extras.nameOf?.(smiles) ?? null
  const literature = {
    secondaryToPrimary: has('secondary') ? method.rSecondary / method.rPrimary : null,
    tertiaryToPrimary: has('tertiary') ? method.rTertiary / method.rPrimary : null,
  }
  const model = predicted.map((p) => ({ smiles: p.smiles, percent: p.percent }))
  const substituted = isSubstituted(substrateSmiles)
  return {
    products: analysis.products.map((p, i) => ({
      smiles: p.smiles, label: positionLetter(i), name: nameOf(p.smiles), hydrogens: p.hydrogens, carbonClass: p.carbonClass,
    })),
    windows: windowRows.filter((r) => r.kind === 'product' && r.productSmiles && productSet.has(r.productSmiles))
      .map((r) => ({
        productSmiles: r.productSmiles!, rtMin: r.rtMin, rtMax: r.rtMax, responseFactor: r.responseFactor, name: nameOf(r.productSmiles!),
      })),
    solvent: reference('solvent'),
    startingMaterial: reference('starting-material'),
    predicted: model,
    statistical: analysis.products.map((p) => ({ smiles: p.smiles, percent: (p.hydrogens / totalH) * 100 })),
    literature,
    keyFactor: keyFactorOf(analysis.products),
    expected: (extras.reference && referenceExpectation(analysis, extras.reference, substituted))
      || classModelExpectation({ predicted: model, literature }, substituted),
    productKind: productKindWord(substrateSmiles, method.halogen),
  }
}
