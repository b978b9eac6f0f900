import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { assignPeaks, type Peak, type ProductWindow } from '../../shared/utils/chromatography'
import { rescueDriftedPeaks, type DriftSlot } from '../../shared/utils/lib/retention-drift'

// The window rules stated plainly (PRODUCT.md, "GC peak tables → mole fractions"; common
// practice): a peak belongs to the window that holds it, to the one whose centre is nearest when
// windows overlap (the first listed of equals), with a note; what no window takes stays
// unassigned, in time order. The engines reach these answers by shortcuts for long tables
// (chromatography.ts, retention-drift.ts); these checks state the answers without them.

const time = fc.integer({ min: 0, max: 400 }).map((t) => t / 40)
const windowOf = fc.tuple(time, fc.integer({ min: 1, max: 60 })).map(([start, width]) => ({ rtMin: start, rtMax: start + width / 40 }))
const windows = fc.array(windowOf, { minLength: 1, maxLength: 4 })
  .map((ws) => ws.map((w, i): ProductWindow => ({ productSmiles: `C${'C'.repeat(i)}Cl`, ...w })))
const peaks = fc.array(fc.tuple(time, fc.integer({ min: 1, max: 1e6 })), { maxLength: 60 })
  .map((ps) => ps.map(([retentionTime, area]): Peak => ({ retentionTime, area })))

describe('peaks go to windows by the plain rules', () => {
  it('each peak inside a window goes to the nearest centre (the first of equals), with a note when windows overlap', () => {
    fc.assert(fc.property(windows, peaks, fc.boolean(), (ws, ps, sorted) => {
      const input = sorted ? [...ps].sort((a, b) => a.retentionTime - b.retentionTime) : ps
      const r = assignPeaks(input, ws)
      let overlapping = 0
      for (const p of input) {
        const holding = ws.filter((w) => p.retentionTime >= w.rtMin && p.retentionTime <= w.rtMax)
        if (holding.length === 0) continue
        if (holding.length > 1) overlapping++
        const centre = (w: ProductWindow) => Math.abs(p.retentionTime - (w.rtMin + w.rtMax) / 2)
        const nearest = holding.reduce((best, w) => (centre(w) < centre(best) ? w : best))
        expect(r.products.find((x) => x.smiles === nearest.productSmiles)!.peaks).toContain(p)
      }
      expect(r.flags.filter((f) => f.code === 'overlapping-windows')).toHaveLength(overlapping)
    }), { numRuns: 500 })
  })

  it('what no window takes stays unassigned, in time order, earlier rows first among equal times', () => {
    fc.assert(fc.property(windows, peaks, fc.boolean(), (ws, ps, sorted) => {
      const input = sorted ? [...ps].sort((a, b) => a.retentionTime - b.retentionTime) : ps
      const slots: DriftSlot[] = ws.map((w) => ({ key: w.productSmiles, name: w.productSmiles, product: true, window: w, peaks: [] }))
      const outside = input.filter((p) => !ws.some((w) => p.retentionTime >= w.rtMin && p.retentionTime <= w.rtMax))
      const outcome = rescueDriftedPeaks(slots, outside)
      const drifted = new Set(outcome.drifted.map((d) => d.peak))
      const expected = outside.filter((p) => !drifted.has(p)).sort((a, b) => a.retentionTime - b.retentionTime)
      expect(outcome.unassigned).toStrictEqual(expected)
      // Identity too: the very peaks, not copies, in that order.
      outcome.unassigned.forEach((p, i) => expect(p).toBe(expected[i]))
    }), { numRuns: 500 })
  })
})
