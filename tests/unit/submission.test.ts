import { describe, expect, it } from 'vitest'
import { analyzeSubstrate, predictDistribution } from '../../shared/utils/halogenation'
import { simulatePeakTable, simulateTrace, formatTrace, type BadRun } from '../../shared/utils/simulation'
import { attentionOf, evaluateRun, RunInputError, type RunInput } from '../../shared/utils/submission'
import { keyFactorOf } from '../../shared/utils/key-factor'

// 1-chlorobutane with the demo windows (invented demo column) and Cl2/light reactivities
// 1 : 3.8 : 5.0 per H at 25 °C (NCERT Chemistry class XI worked example).
const analysis = analyzeSubstrate('CCCCCl')
const predicted = predictDistribution(analysis, { primary: 1, secondary: 3.8, tertiary: 5 })
const order = ['ClC(Cl)CCC', 'ClCC(Cl)CC', 'ClCCC(Cl)C', 'ClCCCCCl']
const ranges = [[3.3, 3.55], [3.8, 4.05], [4.4, 4.65], [5.6, 5.85]]
const canonical = order.map((s) => analysis.products.find((p) => p.smiles === analyzeSubstrate(s).canonicalSmiles)!.smiles)
const windows = canonical.map((smiles, i) => ({ productSmiles: smiles, rtMin: ranges[i]![0]!, rtMax: ranges[i]![1]!, responseFactor: 1 }))

function input(text: string, over: Partial<RunInput> = {}): RunInput {
  return {
    text,
    products: analysis.products,
    windows,
    solvent: { rtMin: 1.2, rtMax: 1.6 },
    startingMaterial: { rtMin: 2.1, rtMax: 2.45, responseFactor: 1 },
    predicted: predicted.map((p) => ({ smiles: p.smiles, percent: p.percent })),
    literature: { secondaryToPrimary: 3.8, tertiaryToPrimary: null },
    ...over,
  }
}

const truth = predicted.map((p) => ({ smiles: p.smiles, percent: p.percent }))
const table = (fault: BadRun = 'none', seed = 7) => simulatePeakTable({
  seed, windows, distribution: truth, areaNoise: 0.01, fault, faultProduct: 3,
  solvent: { retentionTime: 1.4, area: 900_000 }, startingMaterial: { retentionTime: 2.3, area: 300_000 },
}).text

describe('evaluateRun', () => {
  it('recovers the true mole % and the 2°:1° factor from a clean peak table', () => {
    const run = evaluateRun(input(table()))
    expect(run.kind).toBe('peak-table')
    for (const p of truth) expect(run.molePercents.find((m) => m.smiles === p.smiles)!.percent).toBeCloseTo(p.percent, 0)
    // The simulated run was made with 1 : 3.8, so the factor comes back near 3.8 (1 % area noise).
    expect(run.factors.secondaryToPrimary!).toBeGreaterThan(3.6)
    expect(run.factors.secondaryToPrimary!).toBeLessThan(4.0)
    expect(attentionOf(run.flags)).toBe(0)
    expect(run.peaks.find((p) => p.retentionTime > 1.2 && p.retentionTime < 1.6)!.assignedTo).toBe('solvent')
  })

  it('flags a missing product, a split peak and the solvent counted as a product', () => {
    expect(evaluateRun(input(table('missing-product'))).flags.map((f) => f.code)).toContain('missing-product')
    expect(evaluateRun(input(table('split-peak'))).flags.map((f) => f.code)).toContain('split-peak')
    const solvent = evaluateRun(input(table('solvent-as-product')))
    expect(solvent.flags.find((f) => f.code === 'solvent-counted')?.severity).toBe('danger')
    expect(attentionOf(solvent.flags)).toBe(2)
  })

  it('flags a result more than twice away from the expected factor', () => {
    const run = evaluateRun(input(table(), { literature: { secondaryToPrimary: 20, tertiaryToPrimary: null } }))
    expect(run.flags.map((f) => f.code)).toContain('far-from-prediction')
  })

  it('reads a raw detector trace and integrates its peaks', () => {
    const peaks = windows.map((w) => ({
      retentionTime: (w.rtMin + w.rtMax) / 2,
      area: truth.find((t) => t.smiles === w.productSmiles)!.percent * 1000,
      sigma: 0.02,
    }))
    const trace = simulateTrace({ seed: 3, peaks, duration: 7, points: 7000, noise: 0.05 })
    const run = evaluateRun(input(formatTrace(trace), { solvent: null, startingMaterial: null }))
    expect(run.kind).toBe('trace')
    for (const p of truth) expect(run.molePercents.find((m) => m.smiles === p.smiles)!.percent).toBeCloseTo(p.percent, 0)
  })

  it('refuses an unreadable file with the row named', () => {
    expect(() => evaluateRun(input('RT,Area\n1.2,abc\n'))).toThrow(RunInputError)
    try {
      evaluateRun(input('RT,Area\n1.2,abc\n'))
    } catch (error) {
      expect((error as RunInputError).rows[0]!.row).toBe(2)
      expect((error as RunInputError).message).toBe('Row 2: the area "abc" is not a number.')
    }
    expect(() => evaluateRun(input('just some words\nand more\n'))).toThrow(/neither a peak table/i)
  })

  it('reads undeclared seconds by the windows, even when every time stays below 90', () => {
    // A fast column: windows end at 1.17 min, so times of 41-69 with no unit can only be seconds.
    const fast = windows.map((w) => ({ ...w, rtMin: w.rtMin / 5, rtMax: w.rtMax / 5 }))
    const rows = fast.map((w) => `${(((w.rtMin + w.rtMax) / 2) * 60).toFixed(2)},${truth.find((t) => t.smiles === w.productSmiles)!.percent * 1000}`)
    expect(Math.max(...rows.map((r) => Number(r.split(',')[0])))).toBeLessThan(90)
    const run = evaluateRun(input(['RT,Area', ...rows].join('\n'), { windows: fast, solvent: null, startingMaterial: null }))
    for (const p of truth) expect(run.molePercents.find((m) => m.smiles === p.smiles)!.percent).toBeCloseTo(p.percent, 1)
    // A late extra peak in minutes (a trichloride at 14 min) keeps the file in minutes.
    const late = evaluateRun(input(['RT,Area', ...windows.map((w) => `${(w.rtMin + w.rtMax) / 2},1000`), '14.2,50'].join('\n')))
    expect(late.molePercents.every((m) => m.percent === 25)).toBe(true)
  })

  it('reads thousands separators in an upload as its numbers say (1,1-dichlorobutane 0.5 %, not 83.8 %)', () => {
    const text = 'RT\tArea\n3.432\t987\n3.939\t45,769\n4.532\t96,376\n5.716\t48,847\n'
    const run = evaluateRun(input(text, { solvent: null, startingMaterial: null }))
    const geminal = run.molePercents.find((m) => m.smiles === canonical[0])!
    // 987 / (987 + 45769 + 96376 + 48847) = 0.514 %
    expect(geminal.percent).toBeCloseTo(0.514, 3)
  })

  it('refuses an absurd area by its row and never returns a non-finite factor', () => {
    try {
      evaluateRun(input('RT,Area\n3.432,1e308\n3.939,45769\n4.532,96376\n5.716,48847\n'))
      expect.unreachable()
    } catch (error) {
      expect((error as RunInputError).rows[0]).toMatchObject({ row: 2 })
    }
    // A vanishing primary share (about 5e-310 %): dividing by it overflows, so the factor is null.
    const text = ['RT,Area', '3.43,1e-306', '3.93,100000', '4.53,100000', '5.72,1e-306'].join('\n')
    const run = evaluateRun(input(text, { solvent: null, startingMaterial: null }))
    expect(run.factors.secondaryToPrimary).toBeNull()
  })

  it('picks the tertiary factor for a substrate with a tertiary C–H', () => {
    expect(keyFactorOf(analyzeSubstrate('CC(C)C(C)C').products)).toBe('tertiaryToPrimary')
    expect(keyFactorOf(analysis.products)).toBe('secondaryToPrimary')
  })
})
