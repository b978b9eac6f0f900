import { describe, expect, it } from 'vitest'
import { computeQuantities, defaultDueAt, defaultItems, expectedProducts, hazardsForReagent, type ItemSpec } from '../../shared/utils/procedure'
import { formatBasis, formatFigure, formatMass, itemsInputSchema } from '../../shared/types/practical'

// Molar masses: IUPAC standard atomic weights (as listed in PRODUCT.md). Densities: CRC
// Handbook, from memory.
const SO2CL2 = { molarMass: 134.96, density: 1.67 }
const AIBN = { molarMass: 164.21 }
const CHLOROBUTANE = { molarMass: 92.57, density: 0.886 }
const DIMETHYLBUTANE = { molarMass: 86.18, density: 0.662 }
// Cl2: 2 × 35.45 (IUPAC standard atomic weight of chlorine, conventional value).
const CHLORINE = { molarMass: 70.90 }

const item = (over: Partial<ItemSpec> & Pick<ItemSpec, 'role' | 'name' | 'basis' | 'amount'>): ItemSpec =>
  ({ smiles: null, molarMass: null, density: null, ...over })

const practical1: ItemSpec[] = [
  item({ role: 'substrate', name: '1-chlorobutane', smiles: 'CCCCCl', ...CHLOROBUTANE, basis: 'mmol', amount: 10 }),
  item({ role: 'halogenating-agent', name: 'sulfuryl chloride', smiles: 'O=S(=O)(Cl)Cl', ...SO2CL2, basis: 'equivalents', amount: 1 }),
  item({ role: 'initiator', name: 'AIBN', smiles: 'CC(C)(C#N)N=NC(C)(C)C#N', ...AIBN, basis: 'mol-percent', amount: 2 }),
  item({ role: 'wash', name: 'aqueous sodium bicarbonate', basis: 'mL', amount: 20 }),
  item({ role: 'drying-agent', name: 'anhydrous magnesium sulfate', basis: 'g', amount: 1 }),
]

describe('computeQuantities', () => {
  it('turns mmol, equivalents and mol % into grams and millilitres (practical 1 scale)', () => {
    const q = computeQuantities(practical1)
    expect(q.problems).toEqual([])
    expect(q.substrateMmol).toBe(10)
    const [substrate, agent, initiator, wash, drying] = q.items
    // 10 mmol × 92.57 g/mol = 0.9257 g; ÷ 0.886 g/mL = 1.0448 mL (IUPAC; CRC, from memory).
    expect(substrate!.grams).toBeCloseTo(0.9257, 4)
    expect(substrate!.millilitres).toBeCloseTo(1.0448, 3)
    // 1.0 equiv of 10 mmol × 134.96 g/mol = 1.3496 g; ÷ 1.67 g/mL = 0.8081 mL.
    expect(agent!.mmol).toBeCloseTo(10, 9)
    expect(agent!.grams).toBeCloseTo(1.3496, 4)
    expect(agent!.millilitres).toBeCloseTo(0.8081, 3)
    // 2 mol % of 10 mmol = 0.2 mmol × 164.21 g/mol = 32.84 mg; a solid: no volume.
    expect(initiator!.mmol).toBeCloseTo(0.2, 9)
    expect(initiator!.grams).toBeCloseTo(0.03284, 5)
    expect(initiator!.millilitres).toBeNull()
    expect(wash).toMatchObject({ mmol: null, grams: null, millilitres: 20 })
    expect(drying).toMatchObject({ mmol: null, grams: 1, millilitres: null })
  })

  it('shows a gas in grams only, even when a density was typed', () => {
    const q = computeQuantities([
      item({ role: 'substrate', name: '2,3-dimethylbutane', smiles: 'CC(C)C(C)C', ...DIMETHYLBUTANE, basis: 'mmol', amount: 10 }),
      item({ role: 'halogenating-agent', name: 'chlorine', smiles: 'ClCl', ...CHLORINE, density: 3.2, basis: 'equivalents', amount: 0.5 }),
    ])
    // 10 mmol × 86.18 g/mol = 0.8618 g; ÷ 0.662 g/mL = 1.3018 mL.
    expect(q.items[0]!.grams).toBeCloseTo(0.8618, 4)
    expect(q.items[0]!.millilitres).toBeCloseTo(1.3018, 3)
    // 0.5 equiv = 5 mmol × 70.90 g/mol = 0.3545 g.
    expect(q.items[1]).toMatchObject({ gas: true, millilitres: null })
    expect(q.items[1]!.grams).toBeCloseTo(0.3545, 4)
  })

  it('takes the substrate in grams or millilitres as the reference too', () => {
    // 1.0448 mL × 0.886 g/mL = 0.9257 g = 10.0 mmol of 1-chlorobutane.
    const q = computeQuantities([
      item({ role: 'substrate', name: '1-chlorobutane', ...CHLOROBUTANE, basis: 'mL', amount: 1.0448 }),
      item({ role: 'halogenating-agent', name: 'sulfuryl chloride', ...SO2CL2, basis: 'equivalents', amount: 1.1 }),
    ])
    expect(q.substrateMmol).toBeCloseTo(10, 2)
    expect(q.items[1]!.mmol).toBeCloseTo(11, 2)
  })

  it('says what is missing instead of inventing numbers', () => {
    const q = computeQuantities([
      item({ role: 'substrate', name: 'unknown oil', basis: 'mL', amount: 2 }),
      item({ role: 'halogenating-agent', name: 'sulfuryl chloride', ...SO2CL2, basis: 'equivalents', amount: 1 }),
      item({ role: 'other', name: 'mystery reagent', basis: 'mmol', amount: 1 }),
    ])
    expect(q.substrateMmol).toBeNull()
    expect(q.items[1]).toMatchObject({ mmol: null, grams: null })
    expect(q.items[2]).toMatchObject({ mmol: 1, grams: null })
    expect(q.problems).toHaveLength(3)
  })
})

describe('defaultItems', () => {
  const substrate = { name: '1-chlorobutane', smiles: 'CCCCCl', molarMass: 92.57, density: 0.886 }

  it('prefills sulfuryl chloride and AIBN for so2cl2-azo with their data', () => {
    const items = defaultItems(substrate, 'so2cl2-azo')
    expect(items.map((i) => [i.role, i.basis, i.amount])).toEqual([
      ['substrate', 'mmol', 10], ['halogenating-agent', 'equivalents', 1], ['initiator', 'mol-percent', 2], ['wash', 'mL', 20], ['drying-agent', 'g', 1],
    ])
    // Molar masses from the structures with IUPAC weights: 134.96 and 164.21 g/mol.
    expect(items[1]!.molarMass).toBeCloseTo(134.96, 1)
    expect(items[1]!.density).toBe(1.67) // CRC Handbook, from memory
    expect(items[2]!.molarMass).toBeCloseTo(164.21, 1)
  })

  it('prefills chlorine as a gas at 0.5 equiv, bromine with its density, NBS with AIBN', () => {
    const cl2 = defaultItems(substrate, 'cl2-light')
    expect(cl2[1]).toMatchObject({ smiles: 'ClCl', density: null, basis: 'equivalents', amount: 0.5 })
    expect(cl2.some((i) => i.role === 'initiator')).toBe(false)
    expect(defaultItems(substrate, 'br2-light')[1]).toMatchObject({ smiles: 'BrBr', density: 3.10 }) // CRC, from memory
    const nbs = defaultItems(substrate, 'nbs')
    expect(nbs.map((i) => i.smiles).slice(1, 3)).toEqual(['O=C1CCC(=O)N1Br', 'CC(C)(C#N)N=NC(C)(C)C#N'])
  })
})

describe('expectedProducts', () => {
  it('predicts 2,3-dimethylbutane with chlorine and light at 1 : 3.8 : 5.0', () => {
    // 12 primary H × 1 : 2 tertiary H × 5.0 → 12/22 = 54.5 % and 10/22 = 45.5 %
    // (NCERT Chemistry class XI per-H values, as in PRODUCT.md).
    const method = { reagent: 'cl2-light', halogen: 'Cl' as const, temperatureC: 25, rPrimary: 1, rSecondary: 3.8, rTertiary: 5 }
    const products = expectedProducts('CC(C)C(C)C', method, [{ productSmiles: 'CC(C)C(C)(C)Cl', rtMin: 3, rtMax: 3.4, responseFactor: 1 }])
    const byClass = Object.fromEntries(products.map((p) => [p.carbonClass, p]))
    expect(byClass.primary!.percent).toBeCloseTo((12 / 22) * 100, 6)
    expect(byClass.tertiary!.percent).toBeCloseTo((10 / 22) * 100, 6)
    expect(byClass.tertiary!.window).toEqual({ rtMin: 3, rtMax: 3.4, responseFactor: 1 })
    expect(byClass.primary!.window).toBeNull()
    // Lettered in the engine's order (lowest atom index first: a methyl, then the CH), listed in
    // elution order, products without a window last.
    expect(products.map((p) => [p.position, p.carbonClass])).toEqual([['b', 'tertiary'], ['a', 'primary']])
  })
})

describe('dates, cautions and formatting', () => {
  it('puts the due date seven days later at 23:59 course time', () => {
    // 2026-10-19 + 7 days = 2026-10-26, 23:59 CDT (UTC−5; IANA tz database) = 04:59 UTC next day.
    expect(defaultDueAt('2026-10-19', 'America/Chicago').toISOString()).toBe('2026-10-27T04:59:00.000Z')
    // After the end of DST on 2026-11-01: CST (UTC−6).
    expect(defaultDueAt('2026-11-02', 'America/Chicago').toISOString()).toBe('2026-11-10T05:59:00.000Z')
  })

  it('maps the stored reagent keys to the cautions', () => {
    expect(hazardsForReagent('so2cl2-azo')).toEqual(['sulfuryl-chloride', 'azo-initiator', 'halogenated-waste'])
    expect(hazardsForReagent('nbs')).toContain('n-bromosuccinimide')
    expect(hazardsForReagent('cl2-light')).toContain('chlorine')
    expect(hazardsForReagent('br2-light')).toContain('bromine')
  })

  it('formats bench figures', () => {
    expect(formatFigure(0.92566)).toBe('0.926')
    expect(formatFigure(1.04476)).toBe('1.045')
    expect(formatFigure(0.03284)).toBe('0.0328')
    expect(formatFigure(20)).toBe('20.0')
    expect(formatMass(0.03284)).toBe('32.8 mg')
    expect(formatMass(1.3496)).toBe('1.350 g')
    expect(formatBasis(0.5, 'equivalents')).toBe('0.5 equiv')
    expect(formatBasis(2, 'mol-percent')).toBe('2 mol %')
  })

  it('refuses items that cannot be worked out', () => {
    const bad = itemsInputSchema.safeParse({ items: [
      { role: 'substrate', name: 'x', basis: 'equivalents', amount: 1, molarMass: 50 },
      { role: 'initiator', name: 'y', basis: 'mol-percent', amount: 2 },
    ] })
    expect(bad.success).toBe(false)
    const fields = bad.error!.issues.map((i) => i.path.join('.'))
    expect(fields).toEqual(expect.arrayContaining(['items.0.basis', 'items.1.molarMass']))
    expect(itemsInputSchema.safeParse({ items: [{ role: 'wash', name: 'water', basis: 'mL', amount: 10 }] }).success).toBe(false)
  })
})
