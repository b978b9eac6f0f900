import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO, expectOk, signedIn, type Answer } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { weeklyDemandChart } from '../../utils/weekly-demand-chart'

// The weekly demand chart on the forecast page, from the data the server sends it: the demo
// course's next four weeks, built into bars by the same function the chart component uses.
// A bar is one reagent's amount in one week; grams of two reagents are never added into one bar
// (a stacked bar would be a total nobody orders), and weeks are named as people read them.

const DAY = 86_400_000
const dateOf = (t: number) => new Date(t).toISOString().slice(0, 10)
const today = dateOf(Date.now())
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec']
/** "week of 30 Nov" for the Monday '2026-11-30', written out here without the app's date helper. */
const weekLabel = (monday: string) => `week of ${Number(monday.slice(8, 10))} ${MONTHS[Number(monday.slice(5, 7)) - 1]}`

let forecast: Answer<'/api/stockroom/forecast'>

beforeAll(async () => {
  const coordinator = await signedIn(DEMO.coordinator)
  const demo = await testDb().selectFrom('courses').select('id').where('code', '=', 'CHEM 2240').executeTakeFirstOrThrow()
  forecast = await expectOk(coordinator.get(`/api/stockroom/forecast?from=${today}&to=${dateOf(Date.now() + 27 * DAY)}&courseId=${demo.id}`))
})
afterAll(closeTestDb)

describe('the weekly demand chart, on the demo forecast', () => {
  it('has a week in which two reagents of one unit are both needed (else this test would prove nothing)', () => {
    const shared = forecast.weeks.some((w) => ['g', 'mL'].some((unit) =>
      forecast.lines.filter((l) => l.unit === unit && l.weeks.some((x) => x.week === w.week && x.required > 0)).length >= 2))
    expect(shared).toBe(true)
  })

  it('draws one bar per reagent and week, each that reagent’s own amount, side by side and never stacked', () => {
    for (const unit of [...new Set(forecast.lines.map((l) => l.unit))]) {
      const lines = forecast.lines.filter((l) => l.unit === unit)
      const chart = weeklyDemandChart(forecast.lines, forecast.weeks, unit)
      expect(chart.data.datasets.map((d) => d.label)).toEqual(lines.map((l) => l.name))
      chart.data.datasets.forEach((dataset, i) => {
        const own = new Map(lines[i]!.weeks.map((w) => [w.week, w.required]))
        expect(dataset.data).toEqual(forecast.weeks.map((w) => own.get(w.week) ?? 0))
        expect(dataset).not.toHaveProperty('stack')
      })
      // Chart.js adds bars of one index together only on stacked scales.
      expect(chart.options.scales.x.stacked).toBe(false)
      expect(chart.options.scales.y.stacked).toBe(false)
      expect(chart.options.scales.y.title.text).toBe(unit)
    }
    // A unit's chart holds only that unit: nothing measured in mL shows up among grams.
    const grams = weeklyDemandChart(forecast.lines, forecast.weeks, 'g')
    expect(grams.names.every((name) => forecast.lines.find((l) => l.name === name)!.unit === 'g')).toBe(true)
  })

  it('names each week "week of 30 Nov", never an ISO week code or an ISO date', () => {
    expect(forecast.weeks.length).toBeGreaterThan(0)
    const chart = weeklyDemandChart(forecast.lines, forecast.weeks, forecast.lines[0]!.unit)
    expect(chart.data.labels).toEqual(forecast.weeks.map((w) => weekLabel(w.week)))
    for (const label of chart.data.labels) {
      expect(label).toMatch(/^week of \d{1,2} [A-Z][a-z]{2}$/)
      expect(label).not.toMatch(/\d{4}-W\d{2}|\d{4}-\d{2}-\d{2}/)
    }
  })
})
