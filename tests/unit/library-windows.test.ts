import { describe, expect, it } from 'vitest'
import {
  DEFAULT_WINDOW_HALF_WIDTH, describeOverlap, draftIsSet, findWindowOverlaps, suggestionsForRun, suggestWindows, windowDisplayName,
  windowDrafts, windowHolding,
} from '../../shared/utils/windows'
import { mulberry32 } from '../../shared/utils/simulation'

const w = (name: string, rtMin: number, rtMax: number, group: string | null = null) => ({ name, rtMin, rtMax, group })

describe('findWindowOverlaps', () => {
  it('finds the pair that shares time and names both', () => {
    const pairs = findWindowOverlaps([w('c', 3.5, 3.7, 'Cl'), w('solvent', 1.2, 1.6), w('b', 3.4, 3.6, 'Cl')])
    expect(pairs.map(([a, b]) => [a.name, b.name])).toEqual([['b', 'c']])
    const sentence = describeOverlap(pairs[0]!)
    expect(sentence).toContain('b at 3.40–3.60 min')
    expect(sentence).toContain('c at 3.50–3.70 min')
  })

  it('lets windows touch at one end', () => {
    expect(findWindowOverlaps([w('a', 1, 2, 'Cl'), w('b', 2, 3, 'Cl')])).toEqual([])
  })

  it('finds a window inside another and every pair of a pile-up', () => {
    const pairs = findWindowOverlaps([w('wide', 1, 5, 'Cl'), w('inner', 2, 3, 'Cl'), w('late', 2.5, 6, 'Cl')])
    expect(pairs.map(([a, b]) => `${a.name}+${b.name}`).sort()).toEqual(['inner+late', 'wide+inner', 'wide+late'].sort())
  })

  it('keeps chlorination and bromination windows apart, but solvent and starting material meet both', () => {
    expect(findWindowOverlaps([w('a, Cl', 3, 3.2, 'Cl'), w('a, Br', 3.1, 3.3, 'Br')])).toEqual([])
    const withSolvent = findWindowOverlaps([w('a, Br', 3.1, 3.3, 'Br'), w('solvent', 3.2, 3.4)])
    expect(withSolvent).toHaveLength(1)
  })
})

describe('suggestWindows', () => {
  it('uses ± 0.08 min around well separated peaks', () => {
    // Default half-width: common practice for packed and wide-bore teaching columns.
    expect(DEFAULT_WINDOW_HALF_WIDTH).toBe(0.08)
    const [first, second] = suggestWindows([3.4, 4.5])
    expect(first!.suggestedWindow).toEqual({ rtMin: 3.32, rtMax: 3.48 })
    expect(second!.suggestedWindow).toEqual({ rtMin: 4.42, rtMax: 4.58 })
  })

  it('narrows to half the distance to the nearest neighbour', () => {
    const [, middle, last] = suggestWindows([3.0, 3.9, 4.0])
    // 0.1 min apart: ± 0.05 min.
    expect(middle!.suggestedWindow).toEqual({ rtMin: 3.85, rtMax: 3.95 })
    expect(last!.suggestedWindow).toEqual({ rtMin: 3.95, rtMax: 4.05 })
    expect(findWindowOverlaps([middle!, last!].map((s, i) => ({ name: String(i), ...s.suggestedWindow })))).toEqual([])
  })

  it('never starts before 0 min and honours a custom half-width', () => {
    expect(suggestWindows([0.05])[0]!.suggestedWindow).toEqual({ rtMin: 0, rtMax: 0.13 })
    expect(suggestWindows([2], { halfWidth: 0.2 })[0]!.suggestedWindow).toEqual({ rtMin: 1.8, rtMax: 2.2 })
    expect(() => suggestWindows([2], { halfWidth: 0 })).toThrow(RangeError)
  })

  it('never suggests overlapping windows, whatever the spacing (seeded random runs)', () => {
    const rng = mulberry32(2240)
    for (let run = 0; run < 200; run++) {
      const times = Array.from({ length: 2 + Math.floor(rng() * 8) }, () => Math.round(rng() * 8000) / 1000)
      const unique = [...new Set(times)]
      const windows = suggestWindows(unique).map((s) => ({ name: String(s.rt), ...s.suggestedWindow }))
      expect(findWindowOverlaps(windows), unique.join(', ')).toEqual([])
      for (const [i, s] of suggestWindows(unique).entries()) {
        expect(s.suggestedWindow.rtMin).toBeLessThanOrEqual(unique[i]!)
        expect(s.suggestedWindow.rtMax).toBeGreaterThanOrEqual(unique[i]!)
      }
    }
  })
})

describe('suggestionsForRun', () => {
  it('says which saved window already holds each peak', () => {
    const saved = [
      { kind: 'solvent' as const, productSmiles: null, rtMin: 1.2, rtMax: 1.6 },
      { kind: 'product' as const, productSmiles: 'CCCC(Cl)Cl', rtMin: 3.3, rtMax: 3.55 },
    ]
    const result = suggestionsForRun(
      [{ retentionTime: 1.41, area: 9e5 }, { retentionTime: 3.42, area: 1200 }, { retentionTime: 7, area: 50 }],
      saved,
    )
    expect(result.map((s) => s.current)).toEqual([
      { kind: 'solvent', productSmiles: null },
      { kind: 'product', productSmiles: 'CCCC(Cl)Cl' },
      null,
    ])
    expect(result[1]!.area).toBe(1200)
    expect(windowHolding(3.55, saved)?.productSmiles).toBe('CCCC(Cl)Cl')
  })
})

describe('the editor rows', () => {
  const products = [
    { label: 'a', smiles: 'ClCCCCCl', brominated: 'ClCCCCBr' },
    { label: 'b', smiles: 'CC(CCCl)Cl', brominated: 'CC(CCCl)Br' },
  ]

  it('list solvent, starting material and each product for both halogens, filled from what is saved', () => {
    const drafts = windowDrafts(products, [
      { kind: 'solvent', productSmiles: null, label: 'dichloromethane', rtMin: 1.2, rtMax: 1.6, responseFactor: 1 },
      { kind: 'product', productSmiles: 'CC(CCCl)Br', label: 'b', rtMin: 6, rtMax: 6.2, responseFactor: 1.2 },
    ])
    expect(drafts.map((d) => d.key)).toEqual(['solvent', 'starting-material', 'Cl:ClCCCCCl', 'Cl:CC(CCCl)Cl', 'Br:ClCCCCBr', 'Br:CC(CCCl)Br'])
    expect(drafts.filter(draftIsSet).map((d) => d.key)).toEqual(['solvent', 'Br:CC(CCCl)Br'])
    expect(drafts[5]).toMatchObject({ position: 'b', halogen: 'Br', rtMin: 6, responseFactor: 1.2 })
    expect(drafts[0]!.label).toBe('dichloromethane')
    expect(windowDrafts(products, [])[0]!.label).toBe('')
  })

  it('are named the way the server names them in its messages', () => {
    expect(windowDisplayName({ kind: 'product', position: 'b', halogen: 'Cl', productSmiles: 'CC(CCCl)Cl' })).toBe('b (CC(CCCl)Cl)')
    expect(windowDisplayName({ kind: 'product', position: 'b', halogen: 'Br', productSmiles: 'CC(CCCl)Br' })).toBe('b, bromo product (CC(CCCl)Br)')
    expect(windowDisplayName({ kind: 'solvent', label: 'dichloromethane' })).toBe('the solvent (dichloromethane)')
    expect(windowDisplayName({ kind: 'solvent', label: '' })).toBe('the solvent')
    expect(windowDisplayName({ kind: 'starting-material', label: 'starting material' })).toBe('the starting material')
  })
})
