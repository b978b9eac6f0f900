import { beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'

let client: Client
beforeAll(async () => { client = await signedIn(DEMO.student(7)) })

const analyze = (body: unknown) => client.post('/api/chemistry/analyze', body)
const byPercent = (products: Array<{ smiles: string, predictedPercent: number }>) =>
  Object.fromEntries(products.map((p) => [p.smiles, Math.round(p.predictedPercent * 10) / 10]))

describe('POST /api/chemistry/analyze', () => {
  it('needs a session', async () => {
    expect((await new Client().post('/api/chemistry/analyze', { smiles: 'CCC' })).status).toBe(401)
  })

  it('2-methylbutane with Cl2/light at 25 °C gives 27.8 / 23.1 / 35.2 / 13.9 %', async () => {
    // Check values: NCERT Chemistry class XI worked example (1 : 3.8 : 5.0 per H at 25 °C).
    const reply = await analyze({ smiles: 'CC(C)CC', halogen: 'Cl' })
    expect(reply.status).toBe(200)
    expect(reply.body.formula).toBe('C5H12')
    expect(reply.body.products).toHaveLength(4)
    const percents = byPercent(reply.body.products)
    // Keys are canonical SMILES from the server; look them up through the reactivity route's matching.
    const values = Object.values(percents).sort((a, b) => a - b)
    expect(values).toEqual([13.9, 23.1, 27.8, 35.2])
    const byClass = (cls: string) => reply.body.products.filter((p) => p.carbonClass === cls).reduce((s, p) => s + p.predictedPercent, 0)
    expect(byClass('primary')).toBeCloseTo(41.7, 1)
    expect(byClass('secondary')).toBeCloseTo(35.2, 1)
    expect(byClass('tertiary')).toBeCloseTo(23.1, 1)
    expect(reply.body.depictionSvg).toMatch(/^<svg/)
    expect(reply.body.depictionSvg).not.toMatch(/<script|on\w+=/i)
  })

  it('accepts explicit reactivities and scales them with temperature', async () => {
    const flat = await analyze({ smiles: 'CCC', reactivity: { primary: 1, secondary: 1, tertiary: 1 } })
    // Equal reactivity per H: the statistical 6 : 2 split (common practice).
    expect(Object.values(byPercent(flat.body.products)).sort()).toEqual([25, 75])
    const hot = await analyze({ smiles: 'CCC', reactivity: { primary: 1, secondary: 4, tertiary: 5 }, temperatureC: 200, referenceTemperatureC: 25 })
    // r(T) = r(T0)^(T0/T): 4^(298.15/473.15)
    expect(hot.body.reactivity.secondary).toBeCloseTo(4 ** (298.15 / 473.15), 6)
  })

  it('1-chlorobutane gives the four dichlorobutanes', async () => {
    const reply = await analyze({ smiles: 'ClCCCC' })
    expect(reply.body.products).toHaveLength(4)
    for (const p of reply.body.products) expect((p.smiles.match(/Cl/g) ?? []).length).toBe(2)
    expect(reply.body.molarMass).toBeCloseTo(92.57, 2) // IUPAC standard atomic weights (PRODUCT.md)
  })

  it.each([
    ['unparsable SMILES', 'C(C'],
    ['unsupported element', 'CCS'],
    ['no C–H bond', 'ClC(Cl)(Cl)Cl'],
    ['too large', 'C'.repeat(41)],
    ['two molecules', 'CC.CC'],
  ])('refuses %s with a 400 and a readable message', async (_case, smiles) => {
    const reply = await analyze({ smiles })
    expect(reply.status).toBe(400)
    expect(typeof reply.refusal.statusMessage).toBe('string')
    expect(reply.refusal.statusMessage.length).toBeGreaterThan(10)
  })

  it('refuses a missing smiles with the field named', async () => {
    const reply = await analyze({ halogen: 'Cl' })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toMatch(/^smiles:/)
  })
})

describe('POST /api/chemistry/reactivity', () => {
  it('needs a session', async () => {
    expect((await new Client().post('/api/chemistry/reactivity', { smiles: 'CCC', observed: [] })).status).toBe(401)
  })

  it('propane at 45 : 55 gives 2°:1° = 3.67, with product SMILES in any spelling', async () => {
    // Check value: 1- : 2-chloropropane ≈ 45 : 55 (widely reported textbook figure;
    // masterorganicchemistry.com, "Selectivity in free radical reactions") → (55/2)/(45/6) = 3.67.
    const reply = await client.post('/api/chemistry/reactivity', {
      smiles: 'CCC',
      observed: [{ smiles: 'ClCCC', percent: 45 }, { smiles: 'C(Cl)(C)C', percent: 55 }],
    })
    expect(reply.status).toBe(200)
    expect(reply.body.factors.secondaryToPrimary).toBeCloseTo(3.667, 3)
    expect(reply.body.factors.tertiaryToPrimary).toBeNull()
    expect(reply.body.factorNotes.tertiaryToPrimary).toMatch(/tertiary/)
  })

  it('reads bromination from the observed products', async () => {
    const reply = await client.post('/api/chemistry/reactivity', {
      smiles: 'CC(C)C',
      observed: [{ smiles: 'BrCC(C)C', percent: 1 }, { smiles: 'CC(C)(C)Br', percent: 99 }],
    })
    expect(reply.status).toBe(200)
    // (99/1) / (1/9) = 891 per H
    expect(reply.body.factors.tertiaryToPrimary).toBeCloseTo(891, 6)
  })

  it('names an unknown product', async () => {
    const reply = await client.post('/api/chemistry/reactivity', { smiles: 'CCC', observed: [{ smiles: 'CCCCCl', percent: 10 }] })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toContain('CCCCCl')
  })
})
