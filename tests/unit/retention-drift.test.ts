import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { assignPeaks, driftReach, type Peak, type ProductWindow } from '../../shared/utils/chromatography'

// Layouts are invented, on the demo's invented column. The behaviour they check is the rule
// (common practice in teaching labs): retention times drift between sessions by a few hundredths
// to about a tenth of a minute, so a lone peak just outside an empty window is that product,
// while a peak another window could claim, or one of two candidates, is left for a person.
const peak = (retentionTime: number, area: number): Peak => ({ retentionTime, area })
const SOLVENT = { rtMin: 1.2, rtMax: 1.6 }
const START = { rtMin: 2.1, rtMax: 2.45, responseFactor: 1 }
const WINDOWS: ProductWindow[] = [
  { productSmiles: 'CCCC(Cl)Cl', name: '1,1-dichlorobutane', rtMin: 3.3, rtMax: 3.55 },
  { productSmiles: 'CCC(Cl)CCl', name: '1,2-dichlorobutane', rtMin: 3.8, rtMax: 4.05 },
  { productSmiles: 'CC(Cl)CCCl', name: '1,3-dichlorobutane', rtMin: 4.4, rtMax: 4.65 },
  { productSmiles: 'ClCCCCCl', name: '1,4-dichlorobutane', rtMin: 5.6, rtMax: 5.85 },
]
const OPTIONS = { solvent: SOLVENT, startingMaterial: START }
const base = (b: Peak | null, extra: Peak[] = []) => [
  peak(1.4, 2e6), peak(2.3, 4e5), peak(3.42, 6e3), ...(b ? [b] : []), peak(4.5, 46e3), peak(5.7, 25e3), ...extra,
]
const codes = (r: ReturnType<typeof assignPeaks>) => r.flags.map((f) => f.code)
const B = 'CCC(Cl)CCl'

describe('retention drift: a lone peak just outside an empty window', () => {
  it('is counted for that window when it came later, with the drift in minutes and a warning, not "missing product"', () => {
    const r = assignPeaks(base(peak(4.12, 23e3)), WINDOWS, OPTIONS)
    const b = r.products.find((p) => p.smiles === B)!
    expect(b.area).toBe(23e3)
    expect(b.driftMinutes).toBeCloseTo(0.07, 10)
    expect(r.unassigned).toEqual([])
    expect(codes(r)).not.toContain('missing-product')
    expect(codes(r)).not.toContain('unassigned-area')
    const drift = r.flags.find((f) => f.code === 'retention-drift' && f.productSmiles === B)!
    expect(drift.severity).toBe('warning')
    expect(drift.message).toMatch(/0\.07 min after the end of the window for 1,2-dichlorobutane \(CCC\(Cl\)CCl\)/)
    expect(drift.message).toMatch(/standard run/)
    expect(drift.message).toMatch(/re-check the windows/)
    expect(r.molePercents.find((m) => m.smiles === B)!.percent).toBeCloseTo((23 / (6 + 23 + 46 + 25)) * 100, 8)
  })

  it('is counted when it came earlier than the window, with a negative drift', () => {
    const r = assignPeaks(base(peak(3.72, 23e3)), WINDOWS, OPTIONS)
    expect(r.products.find((p) => p.smiles === B)!.driftMinutes).toBeCloseTo(-0.08, 10)
    expect(r.flags.find((f) => f.productSmiles === B)!.message).toMatch(/before the start of the window/)
  })

  it('reaches at least 0.15 min beyond a narrow window, half the width beyond a wide one, never past the midpoint to a neighbour', () => {
    const reach = driftReach([
      { key: 'a', name: 'a', product: true, window: { rtMin: 0.5, rtMax: 0.6 }, peaks: [] },
      { key: 'b', name: 'b', product: true, window: { rtMin: 2, rtMax: 3 }, peaks: [] },
      { key: 'c', name: 'c', product: true, window: { rtMin: 3.2, rtMax: 3.4 }, peaks: [] },
    ])
    expect(reach[0]).toEqual({ before: 0.15, after: 0.15 })
    expect(reach[1]!.before).toBe(0.5)
    expect(reach[1]!.after).toBeCloseTo(0.1, 10)
    expect(reach[2]!.before).toBeCloseTo(0.1, 10)
    expect(reach[2]!.after).toBeCloseTo(0.15, 10)
  })

  it('is not counted when it lies beyond the tolerance: the product stays missing', () => {
    // 4.22 is 0.17 min after the 1,2- window and 0.18 min before the 1,3- window.
    const r = assignPeaks(base(peak(4.22, 23e3)), WINDOWS, OPTIONS)
    expect(r.products.find((p) => p.smiles === B)!.area).toBe(0)
    expect(r.unassigned.map((p) => p.retentionTime)).toEqual([4.22])
    expect(codes(r)).toEqual(['missing-product'])
  })

  it('is not counted when a nearer window (with its own peak) claims it', () => {
    // 3.66 is 0.11 min after the 1,1- window and 0.14 min before the empty 1,2- window.
    const r = assignPeaks(base(peak(3.66, 23e3)), WINDOWS, OPTIONS)
    expect(r.products.find((p) => p.smiles === B)!.area).toBe(0)
    expect(r.unassigned.map((p) => p.retentionTime)).toEqual([3.66])
    expect(codes(r)).toContain('missing-product')
    const beside = r.flags.find((f) => f.code === 'retention-drift' && f.retentionTimes?.[0] === 3.66)!
    expect(beside.message).toMatch(/1,1-dichlorobutane .* already has its peak/)
  })

  it('gives the peaks beside one window, and those at one edge of a window, one flag each, listing their times', () => {
    // A long table: twelve small peaks just after the 1,1- window (which has its own), three in its last 0.025 min.
    const after = Array.from({ length: 12 }, (_, i) => peak(3.56 + i * 0.01, 50))
    const edge = [peak(3.53, 40), peak(3.54, 40), peak(3.548, 40)]
    const r = assignPeaks(base(peak(3.9, 23e3), [...edge, ...after]), WINDOWS, OPTIONS)
    const drift = r.flags.filter((f) => f.code === 'retention-drift')
    const beside = drift.filter((f) => /just outside the window for 1,1-dichlorobutane/.test(f.message))
    expect(beside).toHaveLength(1)
    expect(beside[0]!.retentionTimes).toEqual(after.map((p) => p.retentionTime))
    expect(beside[0]!.message).toMatch(/^12 peaks \(3\.56, 3\.57, 3\.58, 3\.59, 3\.60, 3\.61, 3\.62, 3\.63 and 4 more min\) lie just outside/)
    expect(beside[0]!.message).toMatch(/these are probably other compounds/)
    const atEnd = drift.filter((f) => /at the end of the window for 1,1-dichlorobutane/.test(f.message))
    expect(atEnd).toHaveLength(1)
    expect(atEnd[0]!.message).toMatch(/^3 peaks \(3\.53, 3\.54, 3\.55 min\) sit at the end/)
    // Every peak is still counted where it belongs: the window's own three and its first peak, the rest unassigned.
    expect(r.products[0]!.peaks).toHaveLength(4)
    expect(r.unassigned.filter((p) => p.retentionTime > 3.55 && p.retentionTime < 3.7)).toHaveLength(12)
  })

  it('is not counted when two peaks compete for the same empty window', () => {
    const r = assignPeaks(base(peak(4.1, 12e3), [peak(4.15, 11e3)]), WINDOWS, OPTIONS)
    expect(r.products.find((p) => p.smiles === B)!.area).toBe(0)
    expect(r.unassigned.map((p) => p.retentionTime)).toEqual([4.1, 4.15])
    expect(codes(r)).toContain('missing-product')
    const contested = r.flags.find((f) => f.code === 'retention-drift' && f.productSmiles === B)!
    expect(contested.retentionTimes).toEqual([4.1, 4.15])
    expect(contested.message).toMatch(/none was counted/)
  })

  it('goes to the nearer of two empty windows, and to neither at the exact midpoint', () => {
    const tight: ProductWindow[] = [{ productSmiles: 'X', rtMin: 3.0, rtMax: 3.2 }, { productSmiles: 'Y', rtMin: 3.4, rtMax: 3.6 }, { productSmiles: 'Z', rtMin: 5, rtMax: 5.2 }]
    const nearer = assignPeaks([peak(3.27, 10), peak(5.1, 10)], tight)
    expect(nearer.products.map((p) => p.area)).toEqual([10, 0, 10])
    const midway = assignPeaks([peak(3.3, 10), peak(5.1, 10)], tight)
    expect(midway.products.map((p) => p.area)).toEqual([0, 0, 10])
    expect(midway.flags.some((f) => f.code === 'retention-drift' && /midway between the windows for X .* and Y/.test(f.message))).toBe(true)
  })

  it('is never taken from the solvent: a peak in the solvent window stays there, and one in the solvent\'s reach is not a product', () => {
    const close: ProductWindow[] = [{ productSmiles: 'P', name: 'product P', rtMin: 1.7, rtMax: 1.95 }, { productSmiles: 'Q', rtMin: 3, rtMax: 3.2 }]
    // The product window starts 0.1 min after the solvent's: each reaches 0.05 min toward the other.
    const tail = assignPeaks([peak(1.4, 1e6), peak(1.58, 500), peak(1.62, 300), peak(3.1, 50)], close, { solvent: SOLVENT })
    expect(tail.solvent!.peaks.map((p) => p.retentionTime)).toEqual([1.4, 1.58])
    expect(tail.products[0]!.area).toBe(0)
    expect(tail.unassigned.map((p) => p.retentionTime)).toEqual([1.62])
    expect(tail.flags.find((f) => f.code === 'retention-drift' && f.retentionTimes?.[0] === 1.62)!.message).toMatch(/window for the solvent/)
    // Nearer the product window's start than the solvent's end: the product's drifted peak.
    const drifted = assignPeaks([peak(1.4, 1e6), peak(1.67, 40), peak(3.1, 50)], close, { solvent: SOLVENT })
    expect(drifted.products[0]!.area).toBe(40)
    // Overlapping windows leave no reach on the shared side.
    const overlapping: ProductWindow[] = [{ productSmiles: 'P', rtMin: 1.55, rtMax: 1.8 }]
    expect(driftReach([
      { key: 's', name: 's', product: false, window: SOLVENT, peaks: [] },
      { key: 'p', name: 'p', product: true, window: overlapping[0]!, peaks: [] },
    ])[1]!.before).toBe(0)
  })

  it('never gives a drifted peak to the solvent or starting-material window', () => {
    const r = assignPeaks([peak(1.7, 1e6), peak(3.42, 10), peak(3.9, 10), peak(4.5, 10), peak(5.7, 10)], WINDOWS, OPTIONS)
    expect(r.solvent!.peaks).toEqual([])
    expect(r.unassigned.map((p) => p.retentionTime)).toEqual([1.7])
    expect(codes(r)).toContain('missing-solvent')
  })

  it('says when several peaks shifted the same way', () => {
    // Every product 0.05 min late: three cross their window's end, one sits at its end.
    const late = [peak(1.4, 2e6), peak(2.3, 4e5), peak(3.6, 6e3), peak(4.1, 23e3), peak(4.64, 46e3), peak(5.9, 25e3)]
    const r = assignPeaks(late, WINDOWS, OPTIONS)
    expect(r.products.map((p) => p.area)).toEqual([6e3, 23e3, 46e3, 25e3])
    expect(codes(r)).not.toContain('missing-product')
    const agree = r.flags.find((f) => f.code === 'retention-drift' && /All 4 peaks/.test(f.message))!
    expect(agree.severity).toBe('info')
    expect(agree.message).toMatch(/later than their windows/)
    expect(agree.message).toMatch(/whole run seems shifted/)
  })

  it('says when drifted peaks moved both ways, which a shift of the whole run does not explain', () => {
    const mixed = [peak(1.4, 2e6), peak(2.3, 4e5), peak(3.25, 6e3), peak(4.1, 23e3), peak(4.5, 46e3), peak(5.7, 25e3)]
    const r = assignPeaks(mixed, WINDOWS, OPTIONS)
    expect(r.products.map((p) => p.driftMinutes)).toEqual([expect.closeTo(-0.05, 10), expect.closeTo(0.05, 10), null, null])
    expect(r.flags.some((f) => /moved both ways \(1 later, 1 earlier\)/.test(f.message))).toBe(true)
    expect(r.flags.some((f) => /All \d+ peaks/.test(f.message))).toBe(false)
  })

  it('names products with the SMILES beside the name, or the SMILES alone', () => {
    const named = assignPeaks(base(null), WINDOWS, OPTIONS)
    expect(named.flags.find((f) => f.code === 'missing-product')!.message).toMatch(/No peak was found for 1,2-dichlorobutane \(CCC\(Cl\)CCl\)/)
    const bare = assignPeaks(base(null), WINDOWS.map(({ name: _name, ...w }) => w), OPTIONS)
    expect(bare.flags.find((f) => f.code === 'missing-product')!.message).toMatch(/No peak was found for CCC\(Cl\)CCl \(/)
  })

  it('does not depend on the order of the peaks (property)', () => {
    const rt = fc.double({ min: 1, max: 6.5, noNaN: true })
    const peakLists = fc.array(
      fc.record({ retentionTime: rt, area: fc.double({ min: 1, max: 1e6, noNaN: true }) }),
      { minLength: 1, maxLength: 10 },
    )
    fc.assert(fc.property(peakLists, fc.integer(), (peaks, seed) => {
      const shuffled = peaks.map((p, i) => ({ p, k: Math.sin(seed + i * 7.77) })).sort((x, y) => x.k - y.k).map((x) => x.p)
      const a = assignPeaks(peaks, WINDOWS, OPTIONS)
      const b = assignPeaks(shuffled, WINDOWS, OPTIONS)
      expect(b.products.map((p) => p.area)).toEqual(a.products.map((p) => expect.closeTo(p.area, 6)))
      expect(b.products.map((p) => p.driftMinutes)).toEqual(a.products.map((p) => p.driftMinutes))
    }), { numRuns: 300 })
  })
})
