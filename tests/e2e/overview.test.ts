import { describe, expect, it } from 'vitest'
import { DEMO, signedIn } from '../support/http'

describe('role overviews with live figures', () => {
  it('the instructor sees the demo queue: results waiting and flagged runs', async () => {
    const reply = await (await signedIn(DEMO.instructor)).get('/api/overview/instructor')
    expect(reply.status).toBe(200)
    const byTitle = Object.fromEntries(reply.body.cards.map((c) => [c.title, c]))
    // The demo seed leaves R1's runs and the flagged ones of practical 1 pending.
    expect(Number(byTitle['Waiting for review']!.value)).toBeGreaterThan(0)
    expect(Number(byTitle['Flagged runs']!.value)).toBeGreaterThan(0)
    // "See them" opens a queue filtered to the waiting runs that need attention.
    expect(byTitle['Flagged runs']!.to).toMatch(/^\/review\/practicals\/\d+\?status=pending&flag=any$/)
    expect(byTitle['Next practical']!.detail).toContain('2,3-dimethylbutane')
    // The meeting in the one date style of every page ("Mon 7 Dec 2026, 08:30"), not "Mon, Dec 7".
    expect(byTitle['Next practical']!.value).toMatch(/^(Mon|Tue|Wed|Thu|Fri|Sat|Sun) \d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2}$/)
    // The seeded practical-1 class: a median near the demo's invented truth, the solvent run flagged.
    const selectivity = byTitle['Class 2°:1° selectivity']
    expect(Number(selectivity!.value)).toBeGreaterThan(2)
    expect(Number(selectivity!.value)).toBeLessThan(4.5)
    expect(selectivity!.detail).toMatch(/outlier/)
    // The card leads with the same figure as the class page and the digests.
    expect(selectivity!.detail).toMatch(/^Geometric mean of \d+ results in .+ \(95 % CI \d+\.\d\d to \d+\.\d\d\); median \d+\.\d\d/)
  })

  it('a TA’s figures cover only their sections', async () => {
    const ta1 = (await (await signedIn(DEMO.ta1)).get('/api/overview/ta')).body
    const instructor = (await (await signedIn(DEMO.instructor)).get('/api/overview/instructor')).body
    const waiting = (o: typeof instructor) => Number(o.cards.find((c) => c.title === 'Waiting for review')!.value)
    expect(waiting(ta1)).toBeLessThan(waiting(instructor))
  })

  it('the coordinator sees the containers to order for the next four weeks', async () => {
    const reply = await (await signedIn(DEMO.coordinator)).get('/api/overview/coordinator')
    const order = reply.body.cards.find((c) => c.title === 'To order for the next four weeks')
    expect(order!.value).toMatch(/^[1-9]\d* container/)
    expect(order!.detail).toContain('2,3-dimethylbutane')
  })
})
