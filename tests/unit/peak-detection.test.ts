import { describe, expect, it } from 'vitest'
import { TraceError, assignPeaks, detectPeaks, parseTrace } from '../../shared/utils/chromatography'
import { formatTrace, simulateTrace } from '../../shared/utils/simulation'

// Invented synthetic peaks (area in signal·min); heights are 60–500 × the noise SD.
const TRUTH = [
  { retentionTime: 2.0, area: 5, sigma: 0.02 },
  { retentionTime: 4.5, area: 2, sigma: 0.025 },
  { retentionTime: 7.1, area: 8, sigma: 0.03 },
  { retentionTime: 7.35, area: 3, sigma: 0.03 },
  { retentionTime: 11.0, area: 1.5, sigma: 0.04 },
  { retentionTime: 15.0, area: 10, sigma: 0.05 },
]

function match<T extends { retentionTime: number }>(found: T[], rt: number): T[] {
  return found.filter((p) => Math.abs(p.retentionTime - rt) < 0.03)
}

describe('detectPeaks on synthetic Gaussian peaks', () => {
  it.each([1, 2, 3, 4])('recovers every area within 1 %% on a sloping noisy baseline, 100,000 points (seed %i)', (seed) => {
    const trace = simulateTrace({ seed, peaks: TRUTH, duration: 20, points: 100_000, baseline: { offset: 50, slope: 3 }, noise: 0.2 })
    const r = detectPeaks(trace)
    expect(r.peaks).toHaveLength(TRUTH.length)
    for (const t of TRUTH) {
      const [p] = match(r.peaks, t.retentionTime)
      expect(p, `peak at ${t.retentionTime}`).toBeDefined()
      expect(Math.abs(p!.area / t.area - 1)).toBeLessThan(0.01)
      expect(Math.abs(p!.retentionTime - t.retentionTime)).toBeLessThan(0.002)
      expect(p!.overlapped).toBe(false)
    }
    expect(r.noise).toBeCloseTo(0.2, 1)
    expect(r.flags).toEqual([])
  })

  it('gives the same areas on a flat and on a steep baseline', () => {
    const flat = detectPeaks(simulateTrace({ seed: 9, peaks: TRUTH, duration: 20, points: 40_000, noise: 0.05 }))
    const steep = detectPeaks(simulateTrace({
      seed: 9, peaks: TRUTH, duration: 20, points: 40_000, baseline: { offset: -20, slope: 40 }, noise: 0.05,
    }))
    steep.peaks.forEach((p, i) => expect(p.area / flat.peaks[i]!.area).toBeCloseTo(1, 2))
  })

  it('is exact on a noiseless trace', () => {
    const r = detectPeaks(simulateTrace({
      seed: 1,
      peaks: [{ retentionTime: 3, area: 1, sigma: 0.02 }, { retentionTime: 6, area: 2, sigma: 0.03 }],
      duration: 10, points: 20_000, baseline: { offset: 10, slope: 1 }, noise: 0,
    }))
    expect(r.peaks.map((p) => p.area)).toEqual([expect.closeTo(1, 4), expect.closeTo(2, 4)])
    expect(r.peaks[0]!.widthAtHalfHeight).toBeCloseTo(2.3548 * 0.02, 3)
  })

  it('works with few points per peak', () => {
    const r = detectPeaks(simulateTrace({
      seed: 2,
      peaks: [{ retentionTime: 3, area: 1, sigma: 0.05 }, { retentionTime: 6, area: 2, sigma: 0.05 }],
      duration: 10, points: 800, noise: 0.01,
    }))
    expect(r.peaks.map((p) => p.area)).toEqual([expect.closeTo(1, 1), expect.closeTo(2, 1)])
  })

  it('finds nothing in baseline noise, and says so', () => {
    const r = detectPeaks(simulateTrace({
      seed: 4, peaks: [], duration: 10, points: 20_000, baseline: { offset: 5, slope: 2 }, noise: 0.3,
    }))
    expect(r.peaks).toEqual([])
    expect(r.flags.map((f) => f.code)).toEqual(['no-peaks'])
  })

  it('drops peaks under minHeight', () => {
    const trace = simulateTrace({
      seed: 5,
      peaks: [{ retentionTime: 3, area: 1, sigma: 0.02 }, { retentionTime: 6, area: 0.05, sigma: 0.02 }],
      duration: 10, points: 20_000, noise: 0.01,
    })
    expect(detectPeaks(trace).peaks).toHaveLength(2)
    expect(detectPeaks(trace, { minHeight: 5 }).peaks).toHaveLength(1)
  })
})

describe('detectPeaks overlap', () => {
  const pair = (gapSigmas: number, ratio = 1) => simulateTrace({
    seed: 6,
    peaks: [{ retentionTime: 3, area: 1, sigma: 0.02 }, { retentionTime: 3 + gapSigmas * 0.02, area: ratio, sigma: 0.02 }],
    duration: 8, points: 30_000, baseline: { offset: 1, slope: 0.5 }, noise: 0.02,
  })

  it('splits a resolved pair (resolution 1.5) without a flag', () => {
    const r = detectPeaks(pair(6))
    expect(r.peaks.map((p) => p.area)).toEqual([expect.closeTo(1, 2), expect.closeTo(1, 2)])
    expect(r.flags).toEqual([])
  })

  it('flags a pair with a valley but too much overlap (resolution 0.75)', () => {
    const r = detectPeaks(pair(3))
    expect(r.peaks).toHaveLength(2)
    expect(r.flags).toEqual([expect.objectContaining({ code: 'overlap', retentionTimes: [expect.closeTo(3, 2), expect.closeTo(3.06, 2)] })])
    expect(r.peaks.every((p) => p.overlapped)).toBe(true)
  })

  it('flags an unresolved shoulder (no valley)', () => {
    const r = detectPeaks(pair(2.4, 0.4))
    expect(r.peaks).toHaveLength(1)
    expect(r.flags.map((f) => f.code)).toEqual(['overlap'])
    expect(r.flags[0]!.message).toMatch(/shoulder/)
  })
})

describe('detectPeaks input checks', () => {
  it('refuses malformed traces', () => {
    const time = Array.from({ length: 20 }, (_, i) => i)
    const signal = time.map(() => 1)
    expect(() => detectPeaks({ time, signal: signal.slice(1) })).toThrow(TraceError)
    expect(() => detectPeaks({ time: time.slice(0, 5), signal: signal.slice(0, 5) })).toThrow(/at least 10/)
    expect(() => detectPeaks({ time: [...time.slice(0, 10), 3, ...time.slice(11)], signal })).toThrow(/does not increase/)
    expect(() => detectPeaks({ time, signal: [Number.NaN, ...signal.slice(1)] })).toThrow(/not a number/)
  })
})

describe('raw trace to mole % (invented data)', () => {
  it('parses, detects and assigns a simulated run', () => {
    const windows = [
      { productSmiles: 'ClCC(C)C(C)C', rtMin: 3.8, rtMax: 4.2 },
      { productSmiles: 'CC(C)C(C)(C)Cl', rtMin: 3.3, rtMax: 3.7 },
    ]
    const trace = simulateTrace({
      seed: 8,
      peaks: [
        { retentionTime: 1.2, area: 200, sigma: 0.03 },
        { retentionTime: 3.5, area: 1.8, sigma: 0.02 },
        { retentionTime: 4.0, area: 4.2, sigma: 0.02 },
      ],
      duration: 6, points: 36_000, baseline: { offset: 3, slope: 0.4 }, noise: 0.05,
    })
    const parsed = parseTrace(formatTrace(trace, { seconds: true }))
    const r = assignPeaks(detectPeaks(parsed).peaks, windows, { solvent: { rtMin: 1, rtMax: 1.4 } })
    expect(r.molePercents[0]!.percent).toBeCloseTo(70, 0)
    expect(r.molePercents[1]!.percent).toBeCloseTo(30, 0)
  })
})
