import { describe, expect, it } from 'vitest'
import {
  allocateStock, buildForecast, perUnitAmount, wastePerUnit, workUnitsOf,
  type ForecastInput, type ForecastItem, type ForecastReagent,
} from '../../shared/utils/forecast'
import { isoWeekLabel, weekStart } from '../../shared/utils/dates'
import { computeQuantities } from '../../shared/utils/procedure'
import { HAZARD_CODE, parseHazardCodes, reagentInputSchema } from '../../shared/types/stockroom'

// Molar masses: IUPAC standard atomic weights (as listed in PRODUCT.md; Cl2 = 2 × 35.45).
// Densities: CRC Handbook, from memory (SO2Cl2 1.67, 1-chlorobutane 0.886, 2,3-dimethylbutane
// 0.662, dichloromethane 1.33 g/mL).
const M = { chlorobutane: 92.57, so2cl2: 134.96, aibn: 164.21, dimethylbutane: 86.18, cl2: 70.90 }
const RHO = { chlorobutane: 0.886, so2cl2: 1.67, dimethylbutane: 0.662, dcm: 1.33 }

const reagent = (over: Partial<ForecastReagent> & Pick<ForecastReagent, 'id' | 'name' | 'unit' | 'containerSize'>): ForecastReagent => ({
  overagePercent: 15, molarMass: null, density: null, physicalState: 'liquid', supplierName: '', hazards: [], ...over,
})
const item = (over: Partial<ForecastItem> & Pick<ForecastItem, 'id' | 'role' | 'name' | 'basis' | 'amount'>): ForecastItem => ({
  smiles: null, molarMass: null, density: null, reagentId: null, solutionPercentWv: null, ...over,
})

/** One item's per-unit amount in the reagent's unit, through the same path the forecast takes. */
function amountOf(items: ForecastItem[], index: number, r: ForecastReagent) {
  const q = computeQuantities(items)
  const result = perUnitAmount(q.items[index]!, items[index]!, r)
  if ('problem' in result) throw new Error(result.problem)
  return result.amount
}

describe('per-unit amounts in the stock unit', () => {
  const substrate = item({ id: 1, role: 'substrate', name: '1-chlorobutane', smiles: 'CCCCCl', molarMass: M.chlorobutane, density: RHO.chlorobutane, basis: 'mmol', amount: 10 })

  it('mmol, equivalents and mol % become mL or g by molar mass and density', () => {
    const items = [
      substrate,
      item({ id: 2, role: 'halogenating-agent', name: 'sulfuryl chloride', smiles: 'O=S(=O)(Cl)Cl', molarMass: M.so2cl2, density: RHO.so2cl2, basis: 'equivalents', amount: 1 }),
      item({ id: 3, role: 'initiator', name: 'AIBN', molarMass: M.aibn, basis: 'mol-percent', amount: 2 }),
    ]
    // 10 mmol × 92.57 g/mol = 0.9257 g ÷ 0.886 g/mL = 1.0448 mL (IUPAC; CRC, from memory).
    expect(amountOf(items, 0, reagent({ id: 1, name: '1-chlorobutane', unit: 'mL', containerSize: 500 }))).toBeCloseTo(1.0448, 4)
    // 10 mmol × 134.96 g/mol = 1.3496 g ÷ 1.67 g/mL = 0.8081 mL.
    expect(amountOf(items, 1, reagent({ id: 2, name: 'sulfuryl chloride', unit: 'mL', containerSize: 100 }))).toBeCloseTo(0.8081, 4)
    // 2 mol % of 10 mmol = 0.2 mmol × 164.21 g/mol = 0.03284 g.
    expect(amountOf(items, 2, reagent({ id: 3, name: 'AIBN', unit: 'g', containerSize: 100, physicalState: 'solid' }))).toBeCloseTo(0.03284, 5)
  })

  it('a gas is counted by mass: 0.5 equiv of chlorine for 10 mmol is 5 mmol × 70.90 g/mol = 0.3545 g', () => {
    const items = [
      item({ id: 1, role: 'substrate', name: '2,3-dimethylbutane', smiles: 'CC(C)C(C)C', molarMass: M.dimethylbutane, density: RHO.dimethylbutane, basis: 'mmol', amount: 10 }),
      item({ id: 2, role: 'halogenating-agent', name: 'chlorine', smiles: 'ClCl', molarMass: M.cl2, basis: 'equivalents', amount: 0.5 }),
    ]
    expect(amountOf(items, 1, reagent({ id: 9, name: 'chlorine', unit: 'g', containerSize: 450, physicalState: 'gas' }))).toBeCloseTo(0.3545, 4)
    const refused = perUnitAmount(computeQuantities(items).items[1]!, items[1]!, reagent({ id: 9, name: 'chlorine', unit: 'mL', containerSize: 450 }))
    expect(refused).toEqual({ problem: expect.stringMatching(/gas is stocked by mass/) })
  })

  it('crosses between g and mL with the catalog density when the item has none', () => {
    // 1.2 mL of 1-chlorobutane stocked by mass: 1.2 × 0.886 = 1.0632 g.
    const byVolume = [item({ id: 1, role: 'substrate', name: '1-chlorobutane', basis: 'mL', amount: 1.2 })]
    expect(amountOf(byVolume, 0, reagent({ id: 1, name: '1-chlorobutane', unit: 'g', containerSize: 500, density: RHO.chlorobutane }))).toBeCloseTo(1.0632, 4)
    // 5 g of dichloromethane stocked by volume: 5 ÷ 1.33 = 3.759 mL.
    const byMass = [substrate, item({ id: 2, role: 'solvent', name: 'dichloromethane', basis: 'g', amount: 5 })]
    expect(amountOf(byMass, 1, reagent({ id: 4, name: 'dichloromethane', unit: 'mL', containerSize: 1000, density: RHO.dcm }))).toBeCloseTo(3.7594, 4)
  })

  it('a solution made up from a stocked solid counts its grams: 20 mL of 5 % w/v bicarbonate is 1.00 g', () => {
    const items = [substrate, item({ id: 2, role: 'wash', name: 'aqueous sodium bicarbonate, 5 %', basis: 'mL', amount: 20, solutionPercentWv: 5 })]
    expect(amountOf(items, 1, reagent({ id: 5, name: 'sodium bicarbonate', unit: 'g', containerSize: 500, physicalState: 'solid' }))).toBeCloseTo(1.0, 9)
  })
})

describe('work units', () => {
  it('per pair counts occupied stations once, and places the unplaced two to a station', () => {
    // 16 students in pairs on stations 1–8: 8 units (the demo sections).
    expect(workUnitsOf(Array.from({ length: 16 }, (_, i) => ({ station: Math.floor(i / 2) + 1 })), 'pair', 2)).toBe(8)
    // 10 placed (four full pairs, two students alone at stations 5 and 6) and one unplaced: 6 + 1 = 7,
    // where ceil(11 / 2) would say 6.
    const partly: Array<{ station: number | null }> = [...[1, 1, 2, 2, 3, 3, 4, 4, 5, 6].map((station) => ({ station })), { station: null }]
    expect(workUnitsOf(partly, 'pair', 2)).toBe(7)
    expect(workUnitsOf([{ station: null }, { station: null }, { station: null }], 'pair', 2)).toBe(2)
  })

  it('per student counts every active student', () => {
    expect(workUnitsOf([{ station: 1 }, { station: 1 }, { station: null }], 'student', 2)).toBe(3)
  })
})

describe('dates', () => {
  it('weeks start on Monday and carry ISO 8601 week numbers', () => {
    expect(weekStart('2027-03-10')).toBe('2027-03-08')
    expect(weekStart('2027-03-08')).toBe('2027-03-08')
    expect(weekStart('2027-03-14')).toBe('2027-03-08')
    // ISO 8601: a week belongs to the year of its Thursday. 2026 starts on a Thursday, so it has
    // 53 weeks and 1 January 2027 (a Friday) falls in 2026-W53; 2027-W01 begins on 4 January.
    expect(isoWeekLabel('2026-01-01')).toBe('2026-W01')
    expect(isoWeekLabel('2026-12-31')).toBe('2026-W53')
    expect(isoWeekLabel('2027-01-01')).toBe('2026-W53')
    expect(isoWeekLabel('2027-01-04')).toBe('2027-W01')
    expect(isoWeekLabel('2027-03-01')).toBe('2027-W09')
  })
})

describe('stock against demand', () => {
  it('draws first-expiring stock first, which covers more than drawing the long-lived lot first', () => {
    // A lot good until the 5th and one without expiry; 6 needed on the 1st, 6 on the 10th.
    const { covered, drawn } = allocateStock(
      [{ date: '2027-03-10', amount: 6 }, { date: '2027-03-01', amount: 6 }],
      [{ id: 1, remaining: 6, expiresOn: null }, { id: 2, remaining: 6, expiresOn: '2027-03-05' }],
    )
    expect(covered).toEqual([6, 6])
    expect(drawn.get(2)).toBe(6)
    expect(drawn.get(1)).toBe(6)
  })

  it('never draws on a lot past its expiry at the meeting date (a lot expiring that day still counts)', () => {
    const { covered } = allocateStock([{ date: '2027-03-10', amount: 5 }], [
      { id: 1, remaining: 3, expiresOn: '2027-03-09' },
      { id: 2, remaining: 2, expiresOn: '2027-03-10' },
    ])
    expect(covered).toEqual([2])
  })
})

// A hand-computed case: one practical per pair at 10 mmol of 2,3-dimethylbutane, 0.5 equiv of
// chlorine, a 20 mL bicarbonate wash (5 % w/v) and 1 g of magnesium sulfate.
const DMB = reagent({ id: 1, name: '2,3-dimethylbutane', unit: 'mL', containerSize: 25, molarMass: M.dimethylbutane, density: RHO.dimethylbutane })
const CL2 = reagent({ id: 2, name: 'chlorine', unit: 'g', containerSize: 450, physicalState: 'gas', overagePercent: 25, hazards: ['chlorine'] })
const BICARB = reagent({ id: 3, name: 'sodium bicarbonate', unit: 'g', containerSize: 500, physicalState: 'solid' })
const MGSO4 = reagent({ id: 4, name: 'magnesium sulfate', unit: 'g', containerSize: 500, physicalState: 'solid' })

function handCase(over: Partial<ForecastInput> = {}): ForecastInput {
  return {
    today: '2027-02-20',
    from: '2027-03-01',
    to: '2027-03-14',
    reagents: [DMB, CL2, BICARB, MGSO4],
    practicals: [{
      id: 10, title: 'Photochlorination', courseId: 1, courseCode: 'TEST 1', workUnit: 'pair',
      items: [
        // No molar mass or density on the item: the catalog's fill them in.
        item({ id: 100, role: 'substrate', name: '2,3-dimethylbutane', basis: 'mmol', amount: 10, reagentId: 1 }),
        item({ id: 101, role: 'halogenating-agent', name: 'chlorine', smiles: 'ClCl', molarMass: M.cl2, basis: 'equivalents', amount: 0.5, reagentId: 2 }),
        item({ id: 102, role: 'wash', name: 'sodium bicarbonate, 5 % aqueous', basis: 'mL', amount: 20, reagentId: 3, solutionPercentWv: 5 }),
        item({ id: 103, role: 'drying-agent', name: 'magnesium sulfate', basis: 'g', amount: 1, reagentId: 4 }),
        item({ id: 104, role: 'other', name: 'boiling chips', basis: 'g', amount: 0.1 }),
      ],
    }],
    sessions: [
      { practicalId: 10, sectionId: 1, sectionCode: 'A', meetingDate: '2027-03-01', isMeeting: true, students: 16, units: 8 },
      { practicalId: 10, sectionId: 2, sectionCode: 'B', meetingDate: '2027-03-10', isMeeting: true, students: 11, units: 7 },
      // A date the section skips (a holiday): no demand.
      { practicalId: 10, sectionId: 3, sectionCode: 'C', meetingDate: '2027-03-04', isMeeting: false, students: 12, units: 6 },
    ],
    lots: [
      { id: 1, reagentId: 1, remaining: 10, unit: 'mL', expiresOn: '2027-03-05' },
      { id: 2, reagentId: 1, remaining: 5, unit: 'mL', expiresOn: '2027-02-25' },
      { id: 3, reagentId: 1, remaining: 4, unit: 'mL', expiresOn: null },
      { id: 4, reagentId: 2, remaining: 200, unit: 'g', expiresOn: null },
      { id: 5, reagentId: 4, remaining: 10, unit: 'g', expiresOn: '2028-01-01' },
    ],
    rinseMlPerUnit: 10,
    ...over,
  }
}

describe('buildForecast on a hand-computed case', () => {
  // 10 mmol × 86.18 g/mol = 0.8618 g ÷ 0.662 g/mL = 1.301813 mL per pair (IUPAC; CRC, from memory).
  const perPair = (10 * M.dimethylbutane / 1000) / RHO.dimethylbutane
  const result = buildForecast(handCase())
  const line = (name: string) => result.lines.find((l) => l.name === name)!

  it('counts 8 + 7 pairs and skips the date the section does not meet', () => {
    expect(result.sessions.map((s) => [s.sectionCode, s.meetingDate, s.units])).toEqual([['A', '2027-03-01', 8], ['B', '2027-03-10', 7]])
    expect(result.skippedSessions).toEqual([expect.objectContaining({ sectionCode: 'C', meetingDate: '2027-03-04', reason: expect.stringMatching(/does not meet/) })])
  })

  it('2,3-dimethylbutane: required, first-expiring stock, the expired lot not counted, whole 25 mL bottles', () => {
    const l = line('2,3-dimethylbutane')
    // A: 8 × 1.301813 × 1.15 = 11.97668 mL; B: 7 × 1.301813 × 1.15 = 10.47959 mL.
    expect(perPair).toBeCloseTo(1.301813, 6)
    expect(l.weeks).toEqual([{ week: '2027-03-01', required: 11.977 }, { week: '2027-03-08', required: 10.48 }])
    expect(l.required).toBeCloseTo(22.456, 3)
    // Lot 1 (10 mL, good until 5 March) goes to A with 1.977 mL of lot 3; lot 3's other 2.023 mL
    // go to B; lot 2 expired in February. On hand 14 mL, short 8.456 mL: one 25 mL bottle.
    expect(l.onHand).toBeCloseTo(14, 3)
    expect(l.shortfall).toBeCloseTo(8.456, 3)
    expect(l.containers).toBe(1)
    expect(l.containerSize).toBe(25)
    expect(l.orderQuantity).toBe(25)
    expect(l.notCounted).toBeCloseTo(5, 3)
    expect(l.unit).toBe('mL')
  })

  it('chlorine: its own 25 % overage, a cylinder with plenty left', () => {
    const l = line('chlorine')
    // 15 pairs × 0.3545 g × 1.25 = 6.646875 g; 200 g on hand.
    expect(l.required).toBeCloseTo(6.647, 3)
    expect(l.onHand).toBe(200)
    expect([l.shortfall, l.containers]).toEqual([0, 0])
    expect(l.hazards).toEqual(['chlorine'])
  })

  it('bicarbonate (none in stock) and magnesium sulfate (10 g left) round up to 500 g containers', () => {
    // 15 × 20 mL × 0.05 g/mL × 1.15 = 17.25 g; 15 × 1 g × 1.15 = 17.25 g.
    expect(line('sodium bicarbonate')).toMatchObject({ required: 17.25, onHand: 0, shortfall: 17.25, containers: 1, containerSize: 500 })
    expect(line('magnesium sulfate')).toMatchObject({ required: 17.25, onHand: 10, shortfall: 7.25, containers: 1 })
    expect(result.lines.map((l) => l.name)).toEqual(['2,3-dimethylbutane', 'chlorine', 'magnesium sulfate', 'sodium bicarbonate'])
  })

  it('halogenated waste: (1.302 mL of substrate + 10 mL rinse) per pair; the gas and the wash are not counted', () => {
    // A: 8 × 11.301813 = 90.41 → 90.4 mL; B: 7 × 11.301813 = 79.11 → 79.1 mL.
    expect(result.sessions.map((s) => s.halogenatedWasteMl)).toEqual([90.4, 79.1])
    expect(result.halogenatedWasteMl).toBe(169.5)
    expect(result.weeks).toEqual([
      { week: '2027-03-01', isoWeek: '2027-W09', sessions: 1, halogenatedWasteMl: 90.4 },
      { week: '2027-03-08', isoWeek: '2027-W10', sessions: 1, halogenatedWasteMl: 79.1 },
    ])
    expect(result.problems).toEqual([])
  })

  it('meetings between today and the range draw on stock first', () => {
    const later = buildForecast(handCase({ from: '2027-03-08' }))
    const l = later.lines.find((x) => x.name === '2,3-dimethylbutane')!
    expect(later.sessions.map((s) => s.sectionCode)).toEqual(['B'])
    expect(l.reservedEarlier).toBeCloseTo(11.977, 3)
    expect(l.required).toBeCloseTo(10.48, 3)
    // A takes lot 1 and 1.977 mL of lot 3 first; B gets the 2.023 mL left: 10.480 − 2.023 = 8.456.
    expect(l.onHand).toBeCloseTo(2.023, 3)
    expect(l.shortfall).toBeCloseTo(8.456, 3)
  })

  it('a meeting already held is not forecast', () => {
    const past = buildForecast(handCase({ today: '2027-03-05' }))
    expect(past.sessions.map((s) => s.sectionCode)).toEqual(['B'])
    expect(past.skippedSessions.map((s) => s.sectionCode).sort()).toEqual(['A', 'C'])
  })

  it('reports a linked item it cannot convert instead of guessing', () => {
    const noDensity = buildForecast(handCase({ reagents: [{ ...DMB, density: null }, CL2, BICARB, MGSO4] }))
    // The substrate still resolves (mmol needs no density) but cannot become mL.
    expect(noDensity.problems).toEqual([expect.stringMatching(/2,3-dimethylbutane.*no volume/)])
    expect(noDensity.lines.map((l) => l.name)).not.toContain('2,3-dimethylbutane')
  })
})

describe('waste rule', () => {
  it('adds the organic liquids (substrate, liquid agent, solvents) and the rinse allowance', () => {
    const q = computeQuantities([
      item({ id: 1, role: 'substrate', name: '1-chlorobutane', molarMass: M.chlorobutane, density: RHO.chlorobutane, basis: 'mmol', amount: 10 }),
      item({ id: 2, role: 'halogenating-agent', name: 'sulfuryl chloride', molarMass: M.so2cl2, density: RHO.so2cl2, basis: 'equivalents', amount: 1 }),
      item({ id: 3, role: 'solvent', name: 'dichloromethane', basis: 'mL', amount: 2 }),
      item({ id: 4, role: 'wash', name: 'bicarbonate', basis: 'mL', amount: 20 }),
    ]).items
    // 1.0448 + 0.8081 + 2 + 5 mL rinse = 8.853 mL.
    expect(wastePerUnit(q, 5)).toBeCloseTo(8.8529, 3)
  })
})

describe('reagent input', () => {
  const base = { name: 'chlorine', physicalState: 'gas', containerSize: 450, unit: 'g' } as const
  it('accepts GHS hazard statements, alone or combined, and refuses anything else', () => {
    expect(parseHazardCodes('h270, H280;H330 H315')).toEqual(['H270', 'H280', 'H330', 'H315'])
    for (const ok of ['H225', 'H301+H311', 'H410']) expect(HAZARD_CODE.test(ok), ok).toBe(true)
    for (const bad of ['H25', 'H1234', 'EUH014', 'H999', 'P280', 'H225 ']) expect(HAZARD_CODE.test(bad), bad).toBe(false)
    const parsed = reagentInputSchema.safeParse({ ...base, hazardCodes: ['H270', 'P210'] })
    expect(parsed.success).toBe(false)
    expect(parsed.error?.issues[0]?.path).toEqual(['hazardCodes', 1])
  })

  it('a gas is stocked by mass; defaults give 15 % overage', () => {
    expect(reagentInputSchema.safeParse({ ...base, unit: 'mL' }).error?.issues[0]).toMatchObject({ path: ['unit'] })
    expect(reagentInputSchema.parse(base)).toMatchObject({ overagePercent: 15, hazardCodes: [], signalWord: null })
  })
})
