import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { ForecastAnswer } from '#shared/types/stockroom'
import { casNumberProblem } from '../../shared/utils/cas'
import { DEMO, expectOk, signedIn, type Client } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { mondayAfter, practicalMeetingOnce } from '../support/stockroom'

// Prepared solutions counted as their solid, and CAS Registry Numbers: checked on entry and used to
// propose catalog links. Through the real server and database.

let coordinator: Client
const uid = randomUUID().slice(0, 8)
const DAY = 86_400_000
const dateOf = (t: number) => new Date(t).toISOString().slice(0, 10)
// A Monday past every demo meeting and the other stockroom tests' ranges.
const monday = mondayAfter(150)
const rangeOf = (courseId: number) => `/api/stockroom/forecast?from=${monday}&to=${dateOf(Date.parse(monday) + 6 * DAY)}&courseId=${courseId}`

beforeAll(async () => { coordinator = await signedIn(DEMO.coordinator) })
afterAll(closeTestDb)

/** A CAS number no other test run uses, with the check digit the product accepts (the rule itself is tested below). */
function freshCasNumber(): string {
  const body = String(100000 + Math.floor(Math.random() * 899999))
  const digit = [...Array(10).keys()].find((d) => casNumberProblem(`${body.slice(0, 4)}-${body.slice(4)}-${d}`) === null)!
  return `${body.slice(0, 4)}-${body.slice(4)}-${digit}`
}

describe('a prepared solution', () => {
  it('a 5 % w/v wash is counted as grams of its solid, with the water named as not stocked', async () => {
    // 6 students in pairs: 3 work units, each using 15 mL of the wash.
    const wash = `5 % sodium bicarbonate wash ${uid}`
    const { courseId, items } = await practicalMeetingOnce(`wash ${uid}`, monday, 6, [
      { role: 'wash', name: wash, smiles: null, molarMass: null, density: null, basis: 'mL', amount: 15 },
    ])
    const solid = await expectOk(coordinator.post('/api/stockroom/reagents', {
      name: `sodium bicarbonate ${uid}`, physicalState: 'solid', containerSize: 500, unit: 'g', overagePercent: 10,
    }), 201)
    await expectOk(coordinator.post(`/api/stockroom/reagents/${solid.id}/lots`, { quantity: 2, unit: 'g', receivedOn: dateOf(Date.now()) }), 201)
    const linkUrl = `/api/stockroom/items/${items[0]!.id}/reagent`

    // Linked without a strength, mL of wash cannot become grams of a solid without a density: not counted.
    await expectOk(coordinator.request(linkUrl, { method: 'PUT', json: { reagentId: solid.id, percentWv: null } }))
    const plain = await expectOk(coordinator.get(rangeOf(courseId))) as ForecastAnswer
    expect(plain.lines.find((l) => l.reagentId === solid.id)).toBeUndefined()
    expect(plain.problems.join(' ')).toMatch(/no mass could be worked out/)

    // As a 5 % w/v solution of the solid it counts. % w/v is g of solute per 100 mL of solution
    // (IUPAC Gold Book "mass concentration"; the percent form is common practice): 15 mL holds
    // 15 × 5 / 100 = 0.75 g. Three units with 10 % overage: 3 × 0.75 × 1.10 = 2.475 g.
    await expectOk(coordinator.request(linkUrl, { method: 'PUT', json: { reagentId: solid.id, percentWv: 5 } }))
    const counted = await expectOk(coordinator.get(rangeOf(courseId))) as ForecastAnswer
    const line = counted.lines.find((l) => l.reagentId === solid.id)!
    const required = 3 * ((15 * 5) / 100) * 1.1
    expect(line.unit).toBe('g')
    expect(line.required).toBeCloseTo(required, 3)
    expect(line.required).toBeCloseTo(2.475, 3)
    // 2 g on hand: 0.475 g short, one 500 g container.
    expect(line.onHand).toBeCloseTo(2, 3)
    expect(line.shortfall).toBeCloseTo(2.475 - 2, 3)
    expect(line.containers).toBe(1)
    // The solution the range needs: 3 × 15 mL × 1.10 = 49.5 mL, made up with water that is not stock.
    expect(line.solutions).toEqual([{ name: wash, percentWv: 5, solutionMl: 49.5 }])
    expect(counted.problems.join(' ')).not.toMatch(new RegExp(uid))
    expect(counted.lines.some((l) => /water/i.test(l.name))).toBe(false)
    const stored = await testDb().selectFrom('practicalItems').select(['reagentId', 'solutionPercentWv'])
      .where('id', '=', items[0]!.id).executeTakeFirstOrThrow()
    expect(stored).toEqual({ reagentId: solid.id, solutionPercentWv: 5 })
  })

  it('refuses a strength out of range, one for a reagent that is not a solid, naming the field', async () => {
    const { items } = await practicalMeetingOnce(`bad wash ${uid}`, monday, 2, [
      { role: 'wash', name: `wash ${uid}`, smiles: null, molarMass: null, density: null, basis: 'mL', amount: 10 },
    ])
    const solid = await expectOk(coordinator.post('/api/stockroom/reagents', {
      name: `salt ${uid}`, physicalState: 'solid', containerSize: 500, unit: 'g',
    }), 201)
    const liquid = await expectOk(coordinator.post('/api/stockroom/reagents', {
      name: `liquid ${uid}`, physicalState: 'liquid', density: 1.0, containerSize: 500, unit: 'mL',
    }), 201)
    const put = (json: object) => coordinator.request(`/api/stockroom/items/${items[0]!.id}/reagent`, { method: 'PUT', json })
    for (const percentWv of [0, -5, 100.5]) {
      const reply = await put({ reagentId: solid.id, percentWv })
      expect(reply.status, String(percentWv)).toBe(400)
      expect(reply.refusal.statusMessage).toMatch(/^percentWv: /)
    }
    const notSolid = await put({ reagentId: liquid.id, percentWv: 5 })
    expect(notSolid.status).toBe(400)
    expect(notSolid.refusal.statusMessage).toMatch(/^reagentId: .*solid/)
    // 100 % w/v is the upper bound and is taken.
    await expectOk(put({ reagentId: solid.id, percentWv: 100 }))
  })
})

describe('CAS Registry Numbers', () => {
  it('a bad check digit is a 400 naming the field; published numbers are taken', async () => {
    // CAS numbers recalled from memory (CRC Handbook tables): water 7732-18-5, sodium bicarbonate
    // 144-55-8, sulfuryl chloride 7791-25-5, chlorine 7782-50-5. Each with its last digit changed
    // fails the check digit.
    for (const cas of ['7732-18-5', '144-55-8', '7791-25-5', '7782-50-5']) {
      const wrong = cas.replace(/\d$/, (d) => String((Number(d) + 1) % 10))
      const refused = await coordinator.post('/api/stockroom/reagents', {
        name: `checked ${cas} ${uid}`, casNumber: wrong, physicalState: 'solid', containerSize: 100, unit: 'g',
      })
      expect(refused.status, wrong).toBe(400)
      expect(refused.refusal.statusMessage).toMatch(/^casNumber: /)
      const taken = await expectOk(coordinator.post('/api/stockroom/reagents', {
        name: `checked ${cas} ${uid}`, casNumber: cas.replace(/-/g, ' '), physicalState: 'solid', containerSize: 100, unit: 'g',
      }), 201)
      expect(taken.casNumber).toBe(cas)
    }
    const reagent = await testDb().selectFrom('reagents').select('id').where('name', '=', `checked 7732-18-5 ${uid}`).executeTakeFirstOrThrow()
    const patched = await coordinator.request(`/api/stockroom/reagents/${reagent.id}`, { method: 'PATCH', json: { casNumber: '7732-81-5' } })
    expect(patched.status).toBe(400)
    expect(patched.refusal.statusMessage).toMatch(/^casNumber: /)
    const instructor = await signedIn(DEMO.instructor)
    const shape = await instructor.post('/api/substrates', { name: `cas shape ${uid}`, smiles: 'CCCCCC', casNumber: '110-54-X' })
    expect(shape.status).toBe(400)
    expect(shape.refusal.statusMessage).toMatch(/^casNumber: /)
  })

  it('an item carrying a reagent\u2019s CAS number is proposed for it, and counts once the coordinator confirms', async () => {
    const cas = freshCasNumber()
    const substrate = { role: 'substrate', name: `dodecane ${uid}`, smiles: 'CCCCCCCCCCCC', molarMass: 170.34, density: 0.75, basis: 'mL', amount: 1 } as const
    const { courseId, items, owner } = await practicalMeetingOnce(`cas ${uid}`, monday, 4, [
      substrate,
      { role: 'halogenating-agent', name: `chlorinating liquid ${uid}`, smiles: null, molarMass: null, density: 1.67, basis: 'mL', amount: 1.5 },
    ])
    // The instructor gives the item its CAS number through the practical's scale.
    const instructor = await signedIn(owner.email, owner.password)
    const scale = await expectOk(instructor.request(`/api/practicals/${(await testDb().selectFrom('practicalItems').select('practicalId')
      .where('id', '=', items[0]!.id).executeTakeFirstOrThrow()).practicalId}/items`, { method: 'PUT', json: { items: [
      substrate,
      { role: 'halogenating-agent', name: `chlorinating liquid ${uid}`, smiles: null, molarMass: null, density: 1.67, basis: 'mL', amount: 1.5, casNumber: cas },
    ] } })) as { items: Array<{ id: number, casNumber?: string | null }> }
    expect(scale.items[1]!.casNumber).toBe(cas)
    const itemId = scale.items[1]!.id
    const reagent = await expectOk(coordinator.post('/api/stockroom/reagents', {
      name: `reagent by number ${uid}`, casNumber: cas, physicalState: 'liquid', density: 1.67, containerSize: 100, unit: 'mL', overagePercent: 0,
    }), 201)

    const before = await expectOk(coordinator.get(rangeOf(courseId))) as ForecastAnswer
    const proposal = before.unlinkedItems.find((i) => i.practicalItemId === itemId)!
    // Neither structure (none given) nor name matches: the CAS number does.
    expect(proposal).toMatchObject({ casNumber: cas, suggestedReagentId: reagent.id, suggestedBecause: 'cas' })
    expect(before.lines.find((l) => l.reagentId === reagent.id)).toBeUndefined()

    await expectOk(coordinator.request(`/api/stockroom/items/${itemId}/reagent`, { method: 'PUT', json: { reagentId: reagent.id, percentWv: null } }))
    const after = await expectOk(coordinator.get(rangeOf(courseId))) as ForecastAnswer
    expect(after.unlinkedItems.find((i) => i.practicalItemId === itemId)).toBeUndefined()
    // 2 pairs × 1.5 mL, no overage, no stock: 3 mL short.
    expect(after.lines.find((l) => l.reagentId === reagent.id)).toMatchObject({ required: 3, shortfall: 3, containers: 1 })
  })
})
