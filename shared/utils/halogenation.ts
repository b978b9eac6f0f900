// Free-radical halogenation: which monohalogenation products a substrate gives, what the
// per-H model predicts for them, and what observed product ratios say about reactivity.
// Method: PRODUCT.md, "The computation". Pure: no I/O, no clock.
import type { Molecule } from 'openchemlib'
import {
  ChemistryInputError,
  canonicalSmiles,
  formulaAndMass,
  parseSubstrateMolecule,
} from './lib/molecule'

export { ChemistryInputError, SubstrateError, canonicalSmiles, molarMassOf, MAX_HEAVY_ATOMS } from './lib/molecule'
export type { SubstrateErrorCode, FormulaAndMass } from './lib/molecule'

export type CarbonClass = 'primary' | 'secondary' | 'tertiary'
export type Halogen = 'Cl' | 'Br'
/** Relative reactivity per H of each carbon class (usually primary = 1). */
export interface Reactivity {
  primary: number
  secondary: number
  tertiary: number
}

export interface SubstrateProduct {
  /** Canonical SMILES of the monohalogenation product. */
  smiles: string
  /** H atoms whose replacement gives this product (all equivalent carbons together). */
  hydrogens: number
  carbonClass: CarbonClass
  /** Heavy-atom indexes, in the parsed substrate, of the equivalent carbons. */
  atoms: number[]
}

export interface SubstrateAnalysis {
  canonicalSmiles: string
  formula: string
  molarMass: number
  halogen: Halogen
  products: SubstrateProduct[]
}

/** Errors in reactivities, temperatures, observed percentages or amounts. */
export class ReactivityInputError extends ChemistryInputError {
  constructor(code: string, message: string) {
    super(code, message)
    this.name = 'ReactivityInputError'
  }
}

const HALOGEN_ATOMIC_NO: Record<Halogen, number> = { Cl: 17, Br: 35 }
const KELVIN_OFFSET = 273.15

function classOf(mol: Molecule, atom: number): CarbonClass {
  let carbons = 0
  for (let i = 0; i < mol.getConnAtoms(atom); i++) {
    if (mol.getAtomicNo(mol.getConnAtom(atom, i)) === 6) carbons++
  }
  // A carbon with no carbon neighbour (CH4, CH3Cl) is counted as primary (PRODUCT.md).
  return carbons === 3 ? 'tertiary' : carbons === 2 ? 'secondary' : 'primary'
}

function productSmiles(mol: Molecule, atom: number, halogen: Halogen): string {
  const copy = mol.getCompactCopy()
  const x = copy.addAtom(HALOGEN_ATOMIC_NO[halogen])
  copy.addBond(atom, x)
  // Round-trip through canonicalSmiles so generated and client-sent SMILES take one path.
  return canonicalSmiles(copy.toIsomericSmiles())
}

/**
 * Distinct monohalogenation products of a saturated substrate. Carbons with the same
 * topological symmetry rank (stereoheterotopic ones included) give one product; products are
 * ordered by their lowest atom index, which is the order the depiction letters them.
 */
export function analyzeSubstrate(smiles: string, options: { halogen?: Halogen } = {}): SubstrateAnalysis {
  const halogen = options.halogen ?? 'Cl'
  if (!(halogen in HALOGEN_ATOMIC_NO)) throw new ReactivityInputError('invalid-halogen', 'The halogen must be Cl or Br.')
  const mol = parseSubstrateMolecule(smiles)
  const groups = new Map<number, number[]>()
  for (let a = 0; a < mol.getAtoms(); a++) {
    if (mol.getAtomicNo(a) !== 6 || mol.getAllHydrogens(a) === 0) continue
    const rank = mol.getSymmetryRank(a)
    groups.set(rank, [...(groups.get(rank) ?? []), a])
  }
  const bySmiles = new Map<string, SubstrateProduct>()
  for (const atoms of [...groups.values()].sort((p, q) => p[0]! - q[0]!)) {
    const smilesOfProduct = productSmiles(mol, atoms[0]!, halogen)
    const hydrogens = atoms.reduce((sum, a) => sum + mol.getAllHydrogens(a), 0)
    const known = bySmiles.get(smilesOfProduct)
    if (known) {
      // Defensive: two symmetry classes giving one constitution would be merged, not listed twice.
      known.hydrogens += hydrogens
      known.atoms = [...known.atoms, ...atoms].sort((p, q) => p - q)
    } else {
      bySmiles.set(smilesOfProduct, { smiles: smilesOfProduct, hydrogens, carbonClass: classOf(mol, atoms[0]!), atoms })
    }
  }
  const { formula, molarMass } = formulaAndMass(mol)
  return { canonicalSmiles: canonicalSmiles(smiles), formula, molarMass, halogen, products: [...bySmiles.values()] }
}

function assertReactivity(r: Reactivity): void {
  for (const key of ['primary', 'secondary', 'tertiary'] as const) {
    const v = r?.[key]
    if (typeof v !== 'number' || !Number.isFinite(v) || v < 0) {
      throw new ReactivityInputError('invalid-reactivity', `The ${key} reactivity must be a number of zero or more.`)
    }
  }
}

function kelvin(celsius: number, what: string): number {
  if (typeof celsius !== 'number' || !Number.isFinite(celsius) || celsius <= -KELVIN_OFFSET) {
    throw new ReactivityInputError('invalid-temperature', `The ${what} must be a temperature above absolute zero (°C).`)
  }
  return celsius + KELVIN_OFFSET
}

/**
 * Reactivities at another temperature assuming equal pre-exponential factors:
 * r(T) = r(T0)^(T0/T), T in kelvin, applied to reactivities relative to primary = 1.
 */
export function scaleReactivity(reactivity: Reactivity, temperatureC: number, referenceTemperatureC = 25): Reactivity {
  assertReactivity(reactivity)
  if (reactivity.primary <= 0) {
    throw new ReactivityInputError('invalid-reactivity', 'Temperature scaling needs a primary reactivity above zero.')
  }
  const exponent = kelvin(referenceTemperatureC, 'reference temperature') / kelvin(temperatureC, 'temperature')
  const scale = (v: number) => (v / reactivity.primary) ** exponent
  return { primary: 1, secondary: scale(reactivity.secondary), tertiary: scale(reactivity.tertiary) }
}

export interface PredictedProduct extends SubstrateProduct {
  /** Reactivity per H used for this product's class (after any temperature scaling). */
  reactivity: number
  percent: number
}

export interface PredictOptions {
  temperatureC?: number
  /** Temperature the reactivities were measured at; default 25 °C. */
  referenceTemperatureC?: number
}

/** Percent of each product: n_p·r_class(p) / Σ n_q·r_class(q) × 100. */
export function predictDistribution(
  analysis: Pick<SubstrateAnalysis, 'products'>,
  reactivity: Reactivity,
  options: PredictOptions = {},
): PredictedProduct[] {
  assertReactivity(reactivity)
  const r = options.temperatureC === undefined
    ? reactivity
    : scaleReactivity(reactivity, options.temperatureC, options.referenceTemperatureC ?? 25)
  const weights = analysis.products.map((p) => p.hydrogens * r[p.carbonClass])
  const total = weights.reduce((s, w) => s + w, 0)
  if (!(total > 0)) {
    throw new ReactivityInputError(
      'invalid-reactivity',
      'Every C–H site of this substrate has zero reactivity, so no distribution can be predicted.',
    )
  }
  return analysis.products.map((p, i) => ({ ...p, reactivity: r[p.carbonClass], percent: (weights[i]! / total) * 100 }))
}

export interface ObservedProduct {
  smiles: string
  percent: number
}

export interface ReactivityProduct extends SubstrateProduct {
  /** Observed percent, normalised over the substrate's products. */
  percent: number
  /** Fraction per H, x_p / n_p. */
  perHydrogen: number
  /** perHydrogen relative to the reference; null when the reference was not observed. */
  relativeReactivity: number | null
}

export interface ClassFactors {
  secondaryToPrimary: number | null
  tertiaryToPrimary: number | null
}

export interface ReactivityResult {
  products: ReactivityProduct[]
  factors: ClassFactors
  /** Why a factor is null (null when the factor has a value). */
  factorNotes: { secondaryToPrimary: string | null, tertiaryToPrimary: string | null }
  reference: { kind: 'class' | 'site', smiles: string | null, description: string }
  warnings: string[]
}

function matchObserved(analysis: Pick<SubstrateAnalysis, 'products'>, observed: ObservedProduct[]): Map<string, number> {
  if (!Array.isArray(observed) || observed.length === 0) {
    throw new ReactivityInputError('no-observed', 'Enter the observed percentage of at least one product.')
  }
  const known = new Set(analysis.products.map((p) => p.smiles))
  const percents = new Map<string, number>()
  for (const o of observed) {
    let smiles: string
    try {
      smiles = canonicalSmiles(String(o?.smiles ?? ''))
    } catch {
      throw new ReactivityInputError('unparsable-product', `The observed product "${String(o?.smiles ?? '')}" is not a readable SMILES.`)
    }
    if (!known.has(smiles)) {
      throw new ReactivityInputError('unknown-product', `"${o.smiles}" is not a monohalogenation product of this substrate.`)
    }
    if (percents.has(smiles)) throw new ReactivityInputError('duplicate-product', `"${o.smiles}" is listed more than once.`)
    if (typeof o.percent !== 'number' || !Number.isFinite(o.percent) || o.percent < 0) {
      throw new ReactivityInputError('invalid-percent', `The percentage for "${o.smiles}" must be a number of zero or more.`)
    }
    percents.set(smiles, o.percent)
  }
  return percents
}

function pooled(products: ReactivityProduct[], cls: CarbonClass): { x: number, n: number } | null {
  const members = products.filter((p) => p.carbonClass === cls)
  if (members.length === 0) return null
  return { x: members.reduce((s, p) => s + p.percent, 0), n: members.reduce((s, p) => s + p.hydrogens, 0) }
}

const finiteOrNull = (v: number): number | null => (Number.isFinite(v) ? v : null)

function classFactor(products: ReactivityProduct[], cls: 'secondary' | 'tertiary'): { value: number | null, note: string | null } {
  const c = pooled(products, cls)
  if (!c) return { value: null, note: `The substrate has no ${cls} C–H.` }
  const p = pooled(products, 'primary')
  if (!p) return { value: null, note: 'The substrate has no primary C–H to compare with.' }
  if (p.x === 0) return { value: null, note: 'No primary product was observed, so the ratio is undefined.' }
  const value = finiteOrNull((c.x / c.n) / (p.x / p.n))
  return value === null
    ? { value: null, note: 'The primary product is too small against the others for the ratio to be a number.' }
    : { value, note: null }
}

/**
 * Per-H reactivities from observed percentages: ρ_p = x_p / n_p, relative to a reference
 * (default: the primary class pooled, Σx / Σn, which is the primary site itself when there is
 * only one); class factors pool within a class.
 */
export function relativeReactivities(
  analysis: Pick<SubstrateAnalysis, 'products'>,
  observed: ObservedProduct[],
  options: { reference?: string } = {},
): ReactivityResult {
  const percents = matchObserved(analysis, observed)
  const warnings: string[] = []
  // Inputs near the largest double would overflow their sum: share them out on the scale of the largest.
  const largest = Math.max(...percents.values())
  const scale = largest > 0 && !Number.isFinite([...percents.values()].reduce((s, v) => s + v, 0)) ? largest : 1
  const total = [...percents.values()].reduce((s, v) => s + v / scale, 0)
  if (!(total > 0)) throw new ReactivityInputError('no-observed', 'The observed percentages add up to zero.')
  if (scale !== 1 || Math.abs(total - 100) > 0.5) {
    const sum = scale === 1 ? `${total.toFixed(1)} %` : 'far more than 100 %'
    warnings.push(`The observed percentages add up to ${sum}; they were rescaled to 100 %.`)
  }
  for (const p of analysis.products) {
    if (!percents.has(p.smiles)) warnings.push(`No percentage was given for ${p.smiles}; it was counted as 0 %.`)
  }
  const products = analysis.products.map((p) => {
    const percent = ((percents.get(p.smiles) ?? 0) / scale / total) * 100
    return { ...p, percent, perHydrogen: percent / 100 / p.hydrogens, relativeReactivity: null as number | null }
  })
  let reference: ReactivityResult['reference']
  let refValue: number
  const primary = pooled(products, 'primary')
  if (options.reference !== undefined) {
    const smiles = (() => {
      try { return canonicalSmiles(options.reference!) } catch { return '' }
    })()
    const site = products.find((p) => p.smiles === smiles)
    if (!site) {
      throw new ReactivityInputError('invalid-reference', `The reference "${options.reference}" is not one of this substrate's products.`)
    }
    reference = { kind: 'site', smiles: site.smiles, description: `per-H reactivity at the ${site.carbonClass} site giving ${site.smiles}` }
    refValue = site.perHydrogen
  } else if (primary) {
    reference = { kind: 'class', smiles: null, description: 'per-H reactivity of the primary C–H, pooled over all primary sites' }
    refValue = primary.x / 100 / primary.n
  } else {
    const first = products[0]!
    reference = {
      kind: 'site',
      smiles: first.smiles,
      description: `the substrate has no primary C–H; relative to the ${first.carbonClass} site giving ${first.smiles}`,
    }
    refValue = first.perHydrogen
  }
  if (refValue > 0) {
    // A reference far smaller than a site overflows the ratio: no number beats Infinity.
    for (const p of products) p.relativeReactivity = finiteOrNull(p.perHydrogen / refValue)
    if (products.some((p) => p.relativeReactivity === null)) {
      warnings.push('The reference product is too small against the others for a relative reactivity to be given.')
    }
  } else {
    warnings.push('The reference product was not observed, so relative reactivities cannot be given.')
  }
  const sec = classFactor(products, 'secondary')
  const ter = classFactor(products, 'tertiary')
  return {
    products,
    factors: { secondaryToPrimary: sec.value, tertiaryToPrimary: ter.value },
    factorNotes: { secondaryToPrimary: sec.note, tertiaryToPrimary: ter.note },
    reference,
    warnings,
  }
}

export type AmountInput = { mmol: number } | { grams: number } | { millilitres: number }
export interface Amount {
  mmol: number
  grams: number
  /** null when no density is known. */
  millilitres: number | null
}

/** Converts an amount between mmol, g and mL (mL needs a density in g/mL). */
export function convertAmount(amount: AmountInput, substance: { molarMass: number, density?: number | null }): Amount {
  const { molarMass, density } = substance
  if (typeof molarMass !== 'number' || !Number.isFinite(molarMass) || molarMass <= 0) {
    throw new ReactivityInputError('invalid-amount', 'The molar mass must be a positive number (g/mol).')
  }
  const hasDensity = density !== undefined && density !== null
  if (hasDensity && (typeof density !== 'number' || !Number.isFinite(density) || density <= 0)) {
    throw new ReactivityInputError('invalid-amount', 'The density must be a positive number (g/mL).')
  }
  const given = (['mmol', 'grams', 'millilitres'] as const).filter((k) => k in (amount ?? {}))
  if (given.length !== 1) throw new ReactivityInputError('invalid-amount', 'Give exactly one of mmol, grams or millilitres.')
  const key = given[0]!
  const value = (amount as Record<string, unknown>)[key]
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
    throw new ReactivityInputError('invalid-amount', `The amount in ${key} must be a number of zero or more.`)
  }
  let grams: number
  if (key === 'mmol') grams = (value * molarMass) / 1000
  else if (key === 'grams') grams = value
  else {
    if (!hasDensity) throw new ReactivityInputError('invalid-amount', 'A volume can only be converted when the density is known.')
    grams = value * (density as number)
  }
  return {
    mmol: (grams / molarMass) * 1000,
    grams,
    millilitres: hasDensity ? grams / (density as number) : null,
  }
}
