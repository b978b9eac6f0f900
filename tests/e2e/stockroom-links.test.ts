import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { ForecastAnswer } from '#shared/types/stockroom'
import { DEMO, expectOk, signedIn, type Client } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { mondayAfter, practicalMeetingOnce } from '../support/stockroom'

// The forecast says what it cannot count, and proposes catalog links that count only once the
// coordinator confirms them. Through the real server and database.

let coordinator: Client
const uid = randomUUID().slice(0, 8)
const DAY = 86_400_000
const dateOf = (t: number) => new Date(t).toISOString().slice(0, 10)
// A Monday well past every demo meeting and the other stockroom tests' ranges.
const monday = mondayAfter(120)

beforeAll(async () => { coordinator = await signedIn(DEMO.coordinator) })
afterAll(closeTestDb)

/** One meeting of 4 students in pairs; a practical whose three items are not linked. */
function scheduledPractical() {
  // 2,2,4,4-tetramethylpentane written atom-first, so only its canonical form matches the catalog's.
  return practicalMeetingOnce(`link ${uid}`, monday, 4, [
    { role: 'substrate', name: `the alkane ${uid}`, smiles: 'C(C)(C)(C)CC(C)(C)C', molarMass: 128.26, density: 0.72, basis: 'mL', amount: 2 },
    { role: 'wash', name: `Brine ${uid}`, smiles: null, molarMass: null, density: null, basis: 'mL', amount: 10 },
    { role: 'drying-agent', name: `unknown agent ${uid}`, smiles: null, molarMass: null, density: null, basis: 'g', amount: 1 },
  ])
}

describe('what the forecast cannot count', () => {
  it('the headline counts unlinked items; a proposed link counts only after the coordinator confirms it', async () => {
    const { courseId, items } = await scheduledPractical()
    const alkane = await expectOk(coordinator.post('/api/stockroom/reagents', {
      name: `tetramethylpentane ${uid}`, smiles: 'CC(C)(C)CC(C)(C)C', physicalState: 'liquid', density: 0.72, containerSize: 100, unit: 'mL', overagePercent: 0,
    }), 201)
    const brine = await expectOk(coordinator.post('/api/stockroom/reagents', {
      name: `brine ${uid}`, physicalState: 'solution', density: 1.2, containerSize: 1000, unit: 'mL',
    }), 201)
    const url = `/api/stockroom/forecast?from=${monday}&to=${dateOf(Date.parse(monday) + 6 * DAY)}&courseId=${courseId}`

    const before = await expectOk(coordinator.get(url)) as ForecastAnswer
    expect(before.sessions).toHaveLength(1)
    // Nothing is linked, so no line is short: the answer says 3 items are not counted.
    expect(before.lines).toEqual([])
    expect(before.unlinkedItems.map((i) => [i.name, i.suggestedReagentId, i.suggestedBecause])).toEqual([
      [`the alkane ${uid}`, alkane.id, 'structure'],
      [`Brine ${uid}`, brine.id, 'name'],
      [`unknown agent ${uid}`, null, null],
    ])
    // Proposed is not linked.
    const stored = await testDb().selectFrom('practicalItems').select('reagentId').where('id', 'in', items.map((i) => i.id)).execute()
    expect(stored.every((i) => i.reagentId === null)).toBe(true)

    // Dismissed: not proposed again, still not linked.
    await expectOk(coordinator.post(`/api/stockroom/items/${items[1]!.id}/dismiss-link`, { reagentId: brine.id }))
    // Confirmed: linked, and counted.
    await expectOk(coordinator.request(`/api/stockroom/items/${items[0]!.id}/reagent`, { method: 'PUT', json: { reagentId: alkane.id, percentWv: null } }))
    const after = await expectOk(coordinator.get(url)) as ForecastAnswer
    expect(after.unlinkedItems.map((i) => [i.name, i.suggestedReagentId])).toEqual([[`Brine ${uid}`, null], [`unknown agent ${uid}`, null]])
    // 2 pairs × 2 mL, no stock and no overage: 4 mL short, one 100 mL bottle.
    const line = after.lines.find((l) => l.reagentId === alkane.id)
    expect(line).toMatchObject({ required: 4, onHand: 0, shortfall: 4, containers: 1 })
    const brineItem = await testDb().selectFrom('practicalItems').select('reagentId').where('id', '=', items[1]!.id).executeTakeFirstOrThrow()
    expect(brineItem.reagentId).toBeNull()
    const instructor = await signedIn(DEMO.instructor)
    expect((await instructor.post(`/api/stockroom/items/${items[2]!.id}/dismiss-link`, { reagentId: brine.id })).status).toBe(403)
  })
})
