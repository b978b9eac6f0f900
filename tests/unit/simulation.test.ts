import { describe, expect, it } from 'vitest'
import { formatTrace, mulberry32, normalRandom, simulatePeakTable, simulateTrace } from '../../shared/utils/simulation'
import { parsePeakTable, parseTrace } from '../../shared/utils/chromatography'

// Invented demo data only.
const windows = [
  { productSmiles: 'ClCC(C)C(C)C', rtMin: 3.8, rtMax: 4.2 },
  { productSmiles: 'CC(C)C(C)(C)Cl', rtMin: 3.3, rtMax: 3.7 },
]
const distribution = [{ smiles: 'ClCC(C)C(C)C', percent: 60 }, { smiles: 'CC(C)C(C)(C)Cl', percent: 40 }]
const base = { windows, distribution, solvent: { retentionTime: 1.2, area: 1e6 } }

describe('mulberry32 and normalRandom', () => {
  it('is deterministic per seed and uniform on [0, 1)', () => {
    const a = mulberry32(42)
    const b = mulberry32(42)
    const xs = Array.from({ length: 20_000 }, () => a())
    expect(Array.from({ length: 20_000 }, () => b())).toEqual(xs)
    expect(xs.every((x) => x >= 0 && x < 1)).toBe(true)
    expect(xs.reduce((s, x) => s + x, 0) / xs.length).toBeCloseTo(0.5, 1)
    expect(mulberry32(43)()).not.toBe(mulberry32(42)())
  })

  it('gives standard normal deviates', () => {
    const g = normalRandom(mulberry32(7))
    const xs = Array.from({ length: 40_000 }, g)
    const m = xs.reduce((s, x) => s + x, 0) / xs.length
    const sd = Math.sqrt(xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1))
    expect(m).toBeCloseTo(0, 1)
    expect(sd).toBeCloseTo(1, 1)
  })
})

describe('simulatePeakTable', () => {
  it('is reproducible and seed-dependent', () => {
    expect(simulatePeakTable({ seed: 1, ...base }).text).toBe(simulatePeakTable({ seed: 1, ...base }).text)
    expect(simulatePeakTable({ seed: 2, ...base }).text).not.toBe(simulatePeakTable({ seed: 1, ...base }).text)
  })

  it('puts each product inside its window with the right area ratio', () => {
    const sim = simulatePeakTable({ seed: 3, ...base, areaNoise: 0 })
    const [w0, w1] = windows
    const p0 = sim.peaks.find((p) => p.retentionTime >= w0!.rtMin && p.retentionTime <= w0!.rtMax)!
    const p1 = sim.peaks.find((p) => p.retentionTime >= w1!.rtMin && p.retentionTime <= w1!.rtMax)!
    expect(p0.area / p1.area).toBeCloseTo(1.5, 10)
    expect(sim.peaks.map((p) => p.retentionTime)).toEqual([...sim.peaks.map((p) => p.retentionTime)].sort((a, b) => a - b))
    expect(sim.peaks.reduce((s, p) => s + p.areaPercent!, 0)).toBeCloseTo(100, 10)
  })

  it('applies the response factor to the raw area', () => {
    const sim = simulatePeakTable({ seed: 3, windows: [{ ...windows[0]!, responseFactor: 2 }, windows[1]!], distribution, areaNoise: 0 })
    const [a, b] = [...sim.peaks].sort((x, y) => y.retentionTime - x.retentionTime)
    expect(a!.area / b!.area).toBeCloseTo(3, 10)
  })

  it('produces the classic bad runs', () => {
    const normal = simulatePeakTable({ seed: 4, ...base })
    expect(simulatePeakTable({ seed: 4, ...base, fault: 'missing-product', faultProduct: 0 }).peaks).toHaveLength(normal.peaks.length - 1)
    expect(simulatePeakTable({ seed: 4, ...base, fault: 'split-peak', faultProduct: 0 }).peaks).toHaveLength(normal.peaks.length + 1)
    const solvent = simulatePeakTable({ seed: 4, ...base, fault: 'solvent-as-product', faultProduct: 1 })
    expect(solvent.peaks.some((p) => Math.abs(p.retentionTime - 1.2) < 0.01)).toBe(false)
    expect(solvent.peaks.filter((p) => p.retentionTime >= 3.3 && p.retentionTime <= 3.7)).toHaveLength(2)
    const swapped = simulatePeakTable({ seed: 4, ...base, areaNoise: 0, fault: 'swapped-peaks', faultProduct: 0 })
    const inW0 = swapped.peaks.find((p) => p.retentionTime >= 3.8 && p.retentionTime <= 4.2)!
    expect(inW0.area / swapped.peaks.find((p) => p.retentionTime >= 3.3 && p.retentionTime <= 3.7)!.area).toBeCloseTo(40 / 60, 10)
  })

  it.each(['csv', 'semicolon-decimal-comma', 'tab', 'aligned', 'csv-seconds'] as const)('writes a %s export the parser reads back', (style) => {
    const sim = simulatePeakTable({ seed: 9, ...base, style })
    const parsed = parsePeakTable(sim.text)
    expect(parsed.errors).toEqual([])
    expect(parsed.peaks.map((p) => p.retentionTime)).toEqual(sim.peaks.map((p) => expect.closeTo(p.retentionTime, 3)))
    parsed.peaks.forEach((p, i) => expect(p.area / sim.peaks[i]!.area).toBeCloseTo(1, 4))
  })
})

describe('simulateTrace', () => {
  it('draws Gaussian peaks of the requested area on the baseline', () => {
    const tr = simulateTrace({
      seed: 1,
      peaks: [{ retentionTime: 2, area: 3, sigma: 0.05 }],
      duration: 4, points: 4001, baseline: { offset: 1, slope: 2 }, noise: 0,
    })
    expect(tr.time).toHaveLength(4001)
    let area = 0
    for (let i = 1; i < tr.time.length; i++) {
      const base = (t: number) => 1 + 2 * t
      area += 0.5 * (tr.signal[i]! - base(tr.time[i]!) + tr.signal[i - 1]! - base(tr.time[i - 1]!)) * (tr.time[i]! - tr.time[i - 1]!)
    }
    expect(area).toBeCloseTo(3, 6)
  })

  it('is reproducible and round-trips through formatTrace and parseTrace', () => {
    const input = { seed: 5, peaks: [{ retentionTime: 1, area: 1, sigma: 0.02 }], duration: 3, points: 500, noise: 0.01 }
    expect(simulateTrace(input)).toEqual(simulateTrace(input))
    const parsed = parseTrace(formatTrace(simulateTrace(input), { header: false }))
    expect(parsed.time).toHaveLength(500)
    expect(parsed.meta!.headerRow).toBeNull()
  })
})
