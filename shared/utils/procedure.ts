// What one work unit of a practical uses, and what it should expect to make. Pure: plain data
// in, plain data out; no database, no Nuxt, no clock. The seed imports it by relative path, so
// everything here is imported relatively too.
import { analyzeSubstrate, convertAmount, molarMassOf, predictDistribution, type Reactivity, type SubstrateAnalysis } from './halogenation'
import { addDays, zonedInstant } from './dates'
import { positionLetter } from './depiction'
import { methodForReagent } from '../data/halogenation-methods'
import { cautionsForMethod, type HazardKey } from '../data/cautions'
import type { ExpectedProduct, ItemBasisName, ItemRoleName, QuantitiesView, QuantityView } from '../types/practical'

/** The halogenation method keys stored with a method row (methods.reagent). */
export type MethodReagentKey = 'cl2-light' | 'so2cl2-azo' | 'br2-light' | 'nbs'

export function hazardsForReagent(reagent: string): HazardKey[] {
  return cautionsForMethod(reagent)
}

/** Substances handled as gases at the bench: weighed or metered by mass, never by volume. */
const GASES = new Set(['ClCl'])
export const isGas = (smiles: string | null) => Boolean(smiles && GASES.has(smiles.replace(/\s+/g, '')))

export interface ItemSpec {
  role: ItemRoleName
  name: string
  smiles: string | null
  molarMass: number | null
  density: number | null
  basis: ItemBasisName
  amount: number
  /** CAS Registry Number, optional (the stockroom proposes a catalog link on it). */
  casNumber?: string | null
}

function substrateMmolOf(item: ItemSpec | undefined): number | null {
  if (!item || item.molarMass === null) return null
  if (item.basis === 'mmol') return item.amount
  if (item.basis === 'g') return convertAmount({ grams: item.amount }, { molarMass: item.molarMass }).mmol
  if (item.basis === 'mL' && item.density !== null) {
    return convertAmount({ millilitres: item.amount }, { molarMass: item.molarMass, density: item.density }).mmol
  }
  return null
}

/**
 * Each item's amount in mmol, g and mL. mmol is the item's own; equivalents and mol % count
 * against the substrate's mmol. mL needs a density, and a gas is shown in g only. Items without
 * a molar mass (a wash, a drying agent) keep what was given, plus g ↔ mL through a density.
 */
export function computeQuantities(items: ItemSpec[]): QuantitiesView {
  const problems: string[] = []
  const substrate = items.find((i) => i.role === 'substrate')
  const substrateMmol = substrateMmolOf(substrate)
  if (!substrate) problems.push('No item is marked as the substrate.')
  else if (substrateMmol === null) problems.push(`${substrate.name}: the substrate needs a molar mass (and a density when given in mL).`)

  const quantities = items.map((item): QuantityView => {
    const gas = isGas(item.smiles)
    const density = gas ? null : item.density
    const base = { role: item.role, name: item.name, smiles: item.smiles, basis: item.basis, amount: item.amount, gas }
    let mmol: number | null = null
    if (item.basis === 'mmol') mmol = item.amount
    else if (item.basis === 'equivalents') mmol = substrateMmol === null ? null : item.amount * substrateMmol
    else if (item.basis === 'mol-percent') mmol = substrateMmol === null ? null : (item.amount / 100) * substrateMmol

    if (mmol !== null) {
      if (item.molarMass === null) {
        problems.push(`${item.name}: a molar mass is needed to turn mmol into grams.`)
        return { ...base, mmol, grams: null, millilitres: null }
      }
      const a = convertAmount({ mmol }, { molarMass: item.molarMass, density })
      return { ...base, mmol: a.mmol, grams: a.grams, millilitres: a.millilitres }
    }
    if (item.basis === 'equivalents' || item.basis === 'mol-percent') {
      problems.push(`${item.name}: worked out from the substrate, which has no amount in mmol yet.`)
      return { ...base, mmol: null, grams: null, millilitres: null }
    }
    if (item.basis === 'mL' && gas) {
      problems.push(`${item.name}: a gas is dispensed by mass; give it in g, mmol or equivalents.`)
      return { ...base, mmol: null, grams: null, millilitres: null }
    }
    if (item.molarMass !== null) {
      const given = item.basis === 'g' ? { grams: item.amount } : { millilitres: item.amount }
      if ('millilitres' in given && density === null) return { ...base, mmol: null, grams: null, millilitres: item.amount }
      const a = convertAmount(given, { molarMass: item.molarMass, density })
      return { ...base, mmol: a.mmol, grams: a.grams, millilitres: a.millilitres }
    }
    // No molar mass: only mass and volume, through the density when there is one.
    if (item.basis === 'g') return { ...base, mmol: null, grams: item.amount, millilitres: density ? item.amount / density : null }
    return { ...base, mmol: null, grams: density ? item.amount * density : null, millilitres: item.amount }
  })
  return { substrateMmol, items: quantities, problems }
}

export interface MethodLike {
  reagent: string
  halogen: 'Cl' | 'Br'
  temperatureC: number
  rPrimary: number
  rSecondary: number
  rTertiary: number
}

export interface WindowLike {
  productSmiles: string | null
  label?: string
  rtMin: number
  rtMax: number
  responseFactor: number
}

/**
 * The monohalogenation products and their predicted percentages with the method's own per-H
 * reactivities (stored at the method's temperature, so no scaling), each with its
 * retention-time window when the substrate has one and its name (from `nameOf`, else a window
 * label other than the letter); listed in
 * elution order where windows are set, the engine's order otherwise.
 */
export function expectedProducts(
  substrateSmiles: string, method: MethodLike, windows: WindowLike[] = [], nameOf: (smiles: string) => string | null = () => null,
  /** The substrate's analysis for the method's halogen, when the caller has it already. */
  analysis: Pick<SubstrateAnalysis, 'products'> = analyzeSubstrate(substrateSmiles, { halogen: method.halogen }),
): ExpectedProduct[] {
  const reactivity: Reactivity = { primary: method.rPrimary, secondary: method.rSecondary, tertiary: method.rTertiary }
  const byProduct = new Map(windows.filter((w) => w.productSmiles).map((w) => [w.productSmiles!, w]))
  const products = predictDistribution(analysis, reactivity).map((p, i) => {
    const w = byProduct.get(p.smiles)
    const position = positionLetter(i)
    return {
      smiles: p.smiles,
      position,
      name: nameOf(p.smiles) ?? (w?.label && w.label !== position ? w.label : null),
      hydrogens: p.hydrogens,
      carbonClass: p.carbonClass,
      percent: p.percent,
      window: w ? { rtMin: w.rtMin, rtMax: w.rtMax, responseFactor: w.responseFactor } : null,
    }
  })
  const rt = (p: ExpectedProduct) => p.window?.rtMin ?? Number.POSITIVE_INFINITY
  return products.map((p, i) => ({ p, i })).sort((a, b) => rt(a.p) - rt(b.p) || a.i - b.i).map(({ p }) => p)
}

export interface SubstrateLike {
  name: string
  smiles: string
  molarMass: number
  density: number | null
}

const WASH = 'aqueous sodium bicarbonate, 5 % (two 10 mL portions)'
const DRYING_AGENT = 'anhydrous magnesium sulfate'

/**
 * The items a new practical starts with: 10 mmol of the substrate, the method's reagents at the
 * usual teaching-lab scale (common practice), a bicarbonate wash and a drying agent. The
 * instructor edits the amounts. Chlorine is limited to 0.5 equiv: with the alkane in excess,
 * the monochlorides are not chlorinated again, so the mixture stays readable by GC.
 */
export function defaultItems(substrate: SubstrateLike, reagent: string): ItemSpec[] {
  const items: ItemSpec[] = [
    {
      role: 'substrate', name: substrate.name, smiles: substrate.smiles,
      molarMass: substrate.molarMass, density: substrate.density, basis: 'mmol', amount: 10,
    },
  ]
  const method = methodForReagent(reagent)
  for (const r of method?.reagents ?? []) {
    const { molarMass } = molarMassOf(r.smiles)
    const agent = r.role === 'halogenating agent'
    items.push({
      role: agent ? 'halogenating-agent' : 'initiator',
      name: r.name,
      smiles: r.smiles,
      molarMass: Number(molarMass.toFixed(3)),
      density: r.density,
      basis: agent ? 'equivalents' : 'mol-percent',
      amount: agent ? (reagent === 'cl2-light' ? 0.5 : 1) : 2,
    })
  }
  items.push(
    { role: 'wash', name: WASH, smiles: null, molarMass: null, density: null, basis: 'mL', amount: 20 },
    { role: 'drying-agent', name: DRYING_AGENT, smiles: null, molarMass: null, density: null, basis: 'g', amount: 1 },
  )
  return items
}

/** Results are due seven days after the meeting at 23:59, course-local time. */
export function defaultDueAt(meetingDate: string, timezone: string): Date {
  return zonedInstant(addDays(meetingDate, 7), '23:59', timezone)
}
