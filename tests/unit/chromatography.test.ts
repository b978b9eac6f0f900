import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  MAX_PEAK_ROWS,
  WindowError,
  assignPeaks,
  flagsFromParseErrors,
  parsePeakTable,
  parseTrace,
  sniffUpload,
  type Peak,
  type ProductWindow,
} from '../../shared/utils/chromatography'
import { formatTrace, simulatePeakTable, simulateTrace } from '../../shared/utils/simulation'

const fixture = (name: string) => readFileSync(fileURLToPath(new URL(`./fixtures/peak-tables/${name}`, import.meta.url)), 'utf8')

// All valid fixtures hold the same invented four-peak run, in different export shapes.
const RTS = [2.514, 3.087, 3.402, 4.116]
const AREAS = [15234.5, 41020.1, 29871.3, 21825.0]
const PCTS = [14.112, 38, 27.671, 20.217]

const VALID: [string, { areaPercent?: boolean, height?: boolean, warning?: RegExp, unit?: string }][] = [
  ['valid-01-comma-basic.csv', { areaPercent: true }],
  ['valid-02-semicolon-decimal-comma.csv', { areaPercent: true }],
  ['valid-03-tab.tsv', { areaPercent: true, height: true }],
  ['valid-04-seconds-declared.csv', { unit: 's' }],
  ['valid-05-seconds-undeclared.csv', { unit: 's', warning: /read as seconds/ }],
  ['valid-06-preamble.csv', { areaPercent: true }],
  ['valid-07-bom-crlf.csv', { areaPercent: true }],
  ['valid-08-totals-row.csv', { areaPercent: true, warning: /totals row/ }],
  ['valid-09-aligned.txt', { areaPercent: true, warning: /totals row/ }],
  ['valid-10-quoted-thousands.csv', { areaPercent: true }],
  ['valid-11-blank-lines.csv', {}],
  ['valid-12-semicolon-dot-decimals.csv', { height: true }],
  ['valid-13-aligned-blank-type.txt', { areaPercent: true }],
  ['valid-14-rt-sec-word.csv', { areaPercent: true, unit: 's' }],
  ['valid-15-unit-headers.tsv', { areaPercent: true, height: true }],
  ['valid-16-footer-lines.csv', { areaPercent: true, warning: /not part of the table/ }],
  ['valid-17-thousands-dot-decimal-comma.csv', {}],
  ['valid-18-units-row-rel-area.csv', { areaPercent: true, height: true }],
  ['valid-19-two-area-columns.txt', { areaPercent: true, height: true, warning: /totals row/ }],
  ['valid-20-text-footer-decimal-comma.csv', { areaPercent: true, warning: /holds no peak/ }],
]

describe('parsePeakTable on messy but valid exports', () => {
  it.each(VALID)('%s', (name, expected) => {
    const r = parsePeakTable(fixture(name))
    expect(r.errors).toEqual([])
    expect(r.peaks.map((p) => p.retentionTime)).toEqual(RTS.map((v) => expect.closeTo(v, 6)))
    expect(r.peaks.map((p) => p.area)).toEqual(AREAS.map((v) => expect.closeTo(v, 6)))
    if (expected.areaPercent) expect(r.peaks.map((p) => p.areaPercent)).toEqual(PCTS.map((v) => expect.closeTo(v, 6)))
    else expect(r.peaks.every((p) => p.areaPercent === undefined)).toBe(true)
    expect(r.peaks.every((p) => (p.height !== undefined) === !!expected.height)).toBe(true)
    expect(r.meta!.timeUnit).toBe(expected.unit ?? 'min')
    if (expected.warning) expect(r.warnings.join(' ')).toMatch(expected.warning)
  })

  it('reports file line numbers for peaks (preamble counted)', () => {
    expect(parsePeakTable(fixture('valid-06-preamble.csv')).peaks.map((p) => p.row)).toEqual([7, 8, 9, 10])
  })

  it('detects decimal commas in semicolon files even with three decimals ("1,234")', () => {
    const r = parsePeakTable('RT;Area\n1,234;500\n2,345;600\n')
    expect(r.meta!.decimalComma).toBe(true)
    expect(r.peaks.map((p) => p.retentionTime)).toEqual([1.234, 2.345])
  })

  it('reads one decimal mark per column, taking the file\'s when a column alone cannot tell (common practice)', () => {
    // "1,5" can only be a decimal comma, so "2,498" is one too, and the dots in the areas group thousands.
    const r = parsePeakTable('RT;Area\n1,5;1.234\n2,498;15.678\n')
    expect(r.peaks.map((p) => [p.retentionTime, p.area])).toEqual([[1.5, 1234], [2.498, 15678]])
    // A quoted "1,234.5" in a comma file is a thousands comma beside a decimal point.
    expect(parsePeakTable('RT,Area\n1.502,"1,234.5"\n2.498,"12,345"\n').peaks.map((p) => p.area)).toEqual([1234.5, 12345])
  })

  it('refuses a decimal mark that contradicts the rest of its column instead of guessing', () => {
    const r = parsePeakTable('RT;Area\n1,5;1000\n2.5;2000\n3,5;3000\n')
    expect(r.errors).toEqual([expect.objectContaining({ row: 3, code: 'non-numeric', message: expect.stringMatching(/decimal commas elsewhere/) })])
  })

  it('does not take a ratio column ("Area/Height") for the area', () => {
    expect(parsePeakTable('RT,Area/Height,Area\n1.5,20,1000\n2.5,25,2000\n').peaks.map((p) => p.area)).toEqual([1000, 2000])
  })

  it('skips text-only lines after the table, but refuses one between peaks', () => {
    expect(parsePeakTable('RT,Area\n1.5,1000\n2.5,2000\n\nPrinted by,lab3\n').peaks).toHaveLength(2)
    const inside = parsePeakTable('RT,Area\n1.5,1000\nsee note,below\n2.5,2000\n')
    expect(inside.peaks).toEqual([])
    expect(inside.errors[0]).toMatchObject({ row: 3, code: 'non-numeric' })
  })

  it('skips a totals row without a label when its area equals the sum', () => {
    const r = parsePeakTable('RT,Area\n1.0,100\n2.0,300\n,400\n')
    expect(r.errors).toEqual([])
    expect(r.peaks).toHaveLength(2)
    expect(r.warnings.join(' ')).toMatch(/totals row/)
  })

  it('honours an explicit time unit and the expected range hint', () => {
    expect(parsePeakTable('RT,Area\n2.0,1\n3.0,2\n', { timeUnit: 's' }).peaks[0]!.retentionTime).toBeCloseTo(2 / 60, 10)
    const fast = 'RT,Area\n45.0,10\n62.0,20\n80.0,30\n'
    expect(parsePeakTable(fast).meta!.timeUnit).toBe('min') // below the 90 threshold: read as minutes
    expect(parsePeakTable(fast, { expectedMaxMinutes: 2 }).peaks[2]!.retentionTime).toBeCloseTo(80 / 60, 10)
    expect(parsePeakTable('Time [ms],Area\n60000,1\n120000,2\n').peaks.map((p) => p.retentionTime)).toEqual([1, 2])
  })

  it('accepts header spellings: R.Time, tR (min), RT/min, Area [pA*s], % Area, Height', () => {
    for (const [rt, area, pct] of [['R.Time', 'Area [pA*s]', '% Area'], ['tR (min)', 'Peak Area', 'Area Pct'], ['RT/min', 'area', 'area%'], ['Ret. Time [min]', 'Area', 'Area (%)']]) {
      const r = parsePeakTable(`${rt},${area},${pct},Height\n1.5,200,40,12\n2.5,300,60,15\n`)
      expect(r.errors).toEqual([])
      expect(r.peaks[1]).toMatchObject({ retentionTime: 2.5, area: 300, areaPercent: 60, height: 15 })
    }
  })

  it('reads only the first of repeated tables, skips a Σ row and reads typographic minus signs', () => {
    const two = parsePeakTable('Signal 1\nRT,Area\n1.0,10\n2.0,20\n\nSignal 2\nRT,Area\n1.1,5\n')
    expect(two.peaks.map((p) => p.area)).toEqual([10, 20])
    expect(two.warnings.join(' ')).toMatch(/second table starts at row 7/)
    expect(parsePeakTable('RT;Area\n1,0;10\n2,0;20\nΣ;;30\n').peaks).toHaveLength(2)
    expect(parsePeakTable('RT,Area\n1.0,\u221210\n').errors[0]!.code).toBe('negative-value')
  })

  it('accepts exactly the maximum number of rows', () => {
    const rows = Array.from({ length: MAX_PEAK_ROWS }, (_, i) => `${(i + 1) / 100},${i + 1}`)
    expect(parsePeakTable(['RT,Area', ...rows].join('\n')).peaks).toHaveLength(MAX_PEAK_ROWS)
  })
})

const INVALID: [string, string, number][] = [
  ['invalid-01-negative-area.csv', 'negative-value', 3],
  ['invalid-02-non-numeric-area.csv', 'non-numeric', 3],
  ['invalid-03-non-numeric-rt.csv', 'non-numeric', 3],
  ['invalid-04-duplicate-rt.csv', 'duplicate-rt', 4],
  ['invalid-05-no-area-column.csv', 'no-area-column', 1],
  ['invalid-06-no-header.csv', 'no-header', 0],
  ['invalid-07-missing-area-cell.csv', 'non-numeric', 3],
  ['invalid-08-empty.csv', 'empty', 0],
  ['invalid-09-header-only.csv', 'no-peaks', 1],
  ['invalid-10-negative-rt.csv', 'negative-value', 2],
  ['invalid-11-unquoted-decimal-commas.csv', 'misaligned', 2],
  ['invalid-12-no-rt-column.csv', 'no-rt-column', 1],
  ['invalid-13-mixed-decimal-marks.csv', 'non-numeric', 2],
  ['invalid-14-overflowing-area.csv', 'non-numeric', 3],
]

describe('parsePeakTable refusals', () => {
  it.each(INVALID)('%s is refused with %s at row %i', (name, code, row) => {
    const r = parsePeakTable(fixture(name))
    expect(r.peaks).toEqual([])
    expect(r.errors[0]).toMatchObject({ code, row })
    expect(r.errors[0]!.message.length).toBeGreaterThan(10)
  })

  it('names the duplicate row and the row it repeats', () => {
    expect(parsePeakTable(fixture('invalid-04-duplicate-rt.csv')).errors[0]!.message).toMatch(/row 3/)
    // Times out of order: the repeat is still found, and named against the row it repeats.
    const shuffled = parsePeakTable('RT,Area\n3.1,100\n2.0,200\n4.2,300\n2.0,50\n3.1,60\n-0,1\n0,2\n')
    expect(shuffled.errors.map((e) => [e.row, e.code])).toEqual([[5, 'duplicate-rt'], [6, 'duplicate-rt'], [8, 'duplicate-rt']])
    expect(shuffled.errors[0]!.message).toMatch(/already appears on row 3/)
    expect(shuffled.errors[1]!.message).toMatch(/already appears on row 2/)
  })

  it('lists every bad row, not only the first', () => {
    const r = parsePeakTable('RT,Area\n1.0,-5\n2.0,abc\nx,3\n')
    expect(r.errors.map((e) => [e.row, e.code])).toEqual([[2, 'negative-value'], [3, 'non-numeric'], [4, 'non-numeric']])
  })

  it('refuses more than 5,000 data rows at the first row beyond the limit', () => {
    const rows = Array.from({ length: MAX_PEAK_ROWS + 1 }, (_, i) => `${(i + 1) / 100},${i + 1}`)
    const r = parsePeakTable(['RT,Area', ...rows].join('\n'))
    expect(r.errors).toEqual([expect.objectContaining({ code: 'too-many-rows', row: MAX_PEAK_ROWS + 2 })])
  })

  it('refuses files over 2 MB', () => {
    const r = parsePeakTable(`RT,Area\n${'1.0,2.0\n'.repeat(260_000)}`)
    expect(r.errors).toEqual([expect.objectContaining({ code: 'too-large', row: 0 })])
  })

  it('turns parser errors into result flags with stable codes', () => {
    const flags = flagsFromParseErrors(parsePeakTable(fixture('invalid-01-negative-area.csv')).errors)
    expect(flags).toEqual([expect.objectContaining({ code: 'negative-value', severity: 'error' })])
    expect(flagsFromParseErrors(parsePeakTable(fixture('invalid-02-non-numeric-area.csv')).errors)[0]!.code).toBe('non-numeric')
    expect(flagsFromParseErrors(parsePeakTable(fixture('invalid-05-no-area-column.csv')).errors)[0]!.code).toBe('parse-error')
  })
})

const W: ProductWindow[] = [
  { productSmiles: 'ClCCCC', rtMin: 2.3, rtMax: 2.7 },
  { productSmiles: 'CCC(C)Cl', rtMin: 2.9, rtMax: 3.25 },
  { productSmiles: 'CC(Cl)CC', rtMin: 3.3, rtMax: 3.6 },
]
const peak = (retentionTime: number, area: number, extra: Partial<Peak> = {}): Peak => ({ retentionTime, area, ...extra })

describe('assignPeaks', () => {
  it('divides by response factors and normalises over product peaks only', () => {
    const windows = [{ productSmiles: 'A', rtMin: 1, rtMax: 2, responseFactor: 1 }, { productSmiles: 'B', rtMin: 3, rtMax: 4, responseFactor: 1.5 }]
    const r = assignPeaks([peak(0.5, 99999), peak(1.5, 100), peak(3.5, 300), peak(5, 40), peak(6.5, 50)], windows, {
      solvent: { rtMin: 0.3, rtMax: 0.8 },
      startingMaterial: { rtMin: 6, rtMax: 7, responseFactor: 1 },
      unassignedThresholdPercent: 50,
    })
    expect(r.molePercents).toEqual([{ smiles: 'A', percent: expect.closeTo(100 / 3, 10) }, { smiles: 'B', percent: expect.closeTo(200 / 3, 10) }])
    expect(r.solvent!.area).toBe(99999)
    expect(r.startingMaterial!.area).toBe(50)
    expect(r.unassigned.map((p) => p.retentionTime)).toEqual([5])
    expect(r.unassignedPercent).toBeCloseTo((40 / 490) * 100, 10)
    expect(r.conversion).toBeCloseTo((300 / 350) * 100, 10)
    expect(r.flags).toEqual([])
  })

  it('gives no conversion when the starting material has no response factor', () => {
    const r = assignPeaks([peak(2.5, 10), peak(5, 10)], W, { startingMaterial: { rtMin: 4.8, rtMax: 5.2 } })
    expect(r.conversion).toBeNull()
    expect(r.startingMaterial!.area).toBe(10)
  })

  it('flags a missing product and counts it as 0 %', () => {
    const r = assignPeaks([peak(2.5, 10), peak(3.05, 30)], W)
    expect(r.molePercents[2]).toEqual({ smiles: 'CC(Cl)CC', percent: 0 })
    expect(r.flags).toEqual([expect.objectContaining({ code: 'missing-product', productSmiles: 'CC(Cl)CC', severity: 'warning' })])
  })

  it('flags a split peak and adds the areas', () => {
    const r = assignPeaks([peak(2.45, 6), peak(2.55, 4), peak(3.05, 10), peak(3.45, 10)], W)
    expect(r.products[0]!.area).toBe(10)
    expect(r.flags.map((f) => f.code)).toEqual(['split-peak'])
    expect(r.flags[0]!.retentionTimes).toEqual([2.45, 2.55])
  })

  it('flags unassigned area above the threshold (solvent excluded)', () => {
    const base = [peak(0.6, 1e6), peak(2.5, 40), peak(3.05, 30), peak(3.45, 24)]
    expect(assignPeaks([...base, peak(5, 6)], W, { solvent: { rtMin: 0.4, rtMax: 0.8 } }).flags.map((f) => f.code)).toEqual(['unassigned-area'])
    expect(assignPeaks([...base, peak(5, 4)], W, { solvent: { rtMin: 0.4, rtMax: 0.8 } }).flags).toEqual([])
    expect(assignPeaks([...base, peak(5, 4)], W, { solvent: { rtMin: 0.4, rtMax: 0.8 }, unassignedThresholdPercent: 3 }).flags.map((f) => f.code)).toEqual(['unassigned-area'])
  })

  it('flags area % that does not sum to 100 ± 0.5', () => {
    const ok = [peak(2.5, 40, { areaPercent: 40.2 }), peak(3.05, 30, { areaPercent: 30 }), peak(3.45, 30, { areaPercent: 30.2 })]
    expect(assignPeaks(ok, W).flags).toEqual([])
    const off = [peak(2.5, 40, { areaPercent: 40 }), peak(3.05, 30, { areaPercent: 30 }), peak(3.45, 30, { areaPercent: 29 })]
    expect(assignPeaks(off, W).flags.map((f) => f.code)).toEqual(['area-percent-sum'])
  })

  it('flags retention drift at a window edge and just outside it', () => {
    const edge = assignPeaks([peak(2.69, 10), peak(3.05, 10), peak(3.45, 10)], W)
    expect(edge.flags).toEqual([expect.objectContaining({ code: 'retention-drift', severity: 'info' })])
    const outside = assignPeaks([peak(2.5, 10), peak(3.05, 10), peak(3.45, 10), peak(3.62, 0.1)], W)
    expect(outside.flags).toEqual([expect.objectContaining({ code: 'retention-drift', severity: 'warning', retentionTimes: [3.62] })])
  })

  it('leaves out negative and non-numeric peaks with an error flag', () => {
    const r = assignPeaks([peak(2.5, -3), peak(Number.NaN, 3), peak(2.5, 10), peak(3.05, 10), peak(3.45, 10)], W)
    expect(r.flags.map((f) => f.code).sort()).toEqual(['negative-value', 'non-numeric'])
    expect(r.molePercents.map((m) => m.percent)).toEqual([100 / 3, 100 / 3, 100 / 3].map((v) => expect.closeTo(v, 10)))
  })

  it('leaves out absurd peaks and keeps every share finite', () => {
    const r = assignPeaks([peak(2.5, 1e308), peak(3.05, 10), peak(3.45, 10), peak(2.45, 10)], W)
    expect(r.flags.map((f) => f.code)).toContain('out-of-range')
    expect(r.molePercents.map((m) => m.percent)).toEqual([100 / 3, 100 / 3, 100 / 3].map((v) => expect.closeTo(v, 10)))
    expect(assignPeaks([peak(2.5, 10), peak(3.05, 10), peak(3.45, 10), peak(40_000, 5)], W).flags.map((f) => f.code)).toContain('out-of-range')
    // A response factor near zero makes a corrected area overflow: no share is then better than NaN or a guess.
    const tinyRf = assignPeaks(
      [peak(2.5, 1e15), peak(3.05, 1e15)],
      [{ ...W[0]!, responseFactor: 1e-300 }, { ...W[1]!, responseFactor: 1e-300 }],
    )
    expect(tinyRf.molePercents.every((m) => m.percent === null)).toBe(true)
    const largeRf = assignPeaks(
      [peak(2.5, 1e15), peak(3.05, 1e15)],
      [{ ...W[0]!, responseFactor: 1e-293 }, { ...W[1]!, responseFactor: 1e-293 }],
    )
    expect(largeRf.molePercents.map((m) => m.percent)).toEqual([50, 50])
  })

  it('flags a table with no product area at all', () => {
    const r = assignPeaks([peak(7, 100)], W)
    expect(r.molePercents.every((m) => m.percent === null)).toBe(true)
    expect(r.flags.map((f) => f.code)).toContain('no-product-peaks')
  })

  it('refuses unusable windows', () => {
    expect(() => assignPeaks([], [])).toThrow(WindowError)
    expect(() => assignPeaks([], [{ productSmiles: 'A', rtMin: 2, rtMax: 1 }])).toThrow(/start < end/)
    expect(() => assignPeaks([], [{ productSmiles: 'A', rtMin: 1, rtMax: 2, responseFactor: 0 }])).toThrow(/response factor/)
    expect(() => assignPeaks([], [{ productSmiles: 'A', rtMin: 1, rtMax: 2 }, { productSmiles: 'A', rtMin: 3, rtMax: 4 }])).toThrow(/more than one window/)
    expect(() => assignPeaks([], W, { solvent: { rtMin: Number.NaN, rtMax: 1 } })).toThrow(/solvent/)
  })

  const inWindow = fc.constantFrom(...W).chain((w) => fc.double({ min: w.rtMin, max: w.rtMax, noNaN: true }))
  const anyPeak = fc.record({
    retentionTime: fc.oneof(inWindow, fc.double({ min: 0, max: 5, noNaN: true })),
    area: fc.double({ min: 0, max: 1e7, noNaN: true }),
  })
  const peakList = fc.tuple(
    fc.record({ retentionTime: inWindow, area: fc.double({ min: 1, max: 1e7, noNaN: true }) }),
    fc.array(anyPeak, { maxLength: 11 }),
  )
    .map(([first, rest]) => [first, ...rest])

  it('scaling every area by a constant leaves the mole % unchanged (property)', () => {
    fc.assert(fc.property(peakList, fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (peaks, k) => {
      const a = assignPeaks(peaks, W).molePercents
      const b = assignPeaks(peaks.map((p) => ({ ...p, area: p.area * k })), W).molePercents
      b.forEach((m, i) => expect(m.percent).toBeCloseTo(a[i]!.percent!, 8))
    }), { numRuns: 200 })
  })

  it('the order of peaks does not matter (property)', () => {
    fc.assert(fc.property(peakList, fc.integer(), (peaks, seed) => {
      const shuffled = [...peaks].map((p, i) => ({ p, k: Math.sin(seed + i * 12.9898) })).sort((x, y) => x.k - y.k).map((x) => x.p)
      const a = assignPeaks(peaks, W)
      const b = assignPeaks(shuffled, W)
      b.molePercents.forEach((m, i) => expect(m.percent).toBeCloseTo(a.molePercents[i]!.percent!, 8))
      expect(b.flags.map((f) => f.code).sort()).toEqual(a.flags.map((f) => f.code).sort())
    }), { numRuns: 200 })
  })
})

describe('end to end with simulated runs (invented data)', () => {
  const windows = [
    { productSmiles: 'ClCCCCCl', rtMin: 6.0, rtMax: 6.5 },
    { productSmiles: 'CC(Cl)CCCl', rtMin: 5.2, rtMax: 5.6 },
    { productSmiles: 'CCC(Cl)CCl', rtMin: 4.6, rtMax: 5.0 },
    { productSmiles: 'CCCC(Cl)Cl', rtMin: 4.0, rtMax: 4.4 },
  ]
  const distribution = [{ smiles: 'ClCCCCCl', percent: 25 }, { smiles: 'CC(Cl)CCCl', percent: 45 }, { smiles: 'CCC(Cl)CCl', percent: 23 }, { smiles: 'CCCC(Cl)Cl', percent: 7 }]
  const solvent = { rtMin: 1.0, rtMax: 1.4 }

  it.each(['csv', 'semicolon-decimal-comma', 'tab', 'aligned', 'csv-seconds'] as const)('recovers the mole %% from a %s export', (style) => {
    const sim = simulatePeakTable({ seed: 11, windows, distribution, areaNoise: 0, style, solvent: { retentionTime: 1.2, area: 5e6 } })
    const parsed = parsePeakTable(sim.text)
    expect(parsed.errors).toEqual([])
    const r = assignPeaks(parsed.peaks, windows, { solvent })
    for (const d of distribution) expect(r.molePercents.find((m) => m.smiles === d.smiles)!.percent).toBeCloseTo(d.percent, 1)
    expect(r.flags.filter((f) => f.severity !== 'info')).toEqual([])
  })

  it('catches the classic bad runs', () => {
    const run = (fault: 'solvent-as-product' | 'missing-product' | 'split-peak', faultProduct = 1) => {
      const sim = simulatePeakTable({ seed: 5, windows, distribution, fault, faultProduct, solvent: { retentionTime: 1.2, area: 5e6 } })
      return assignPeaks(parsePeakTable(sim.text).peaks, windows, { solvent }).flags.map((f) => f.code)
    }
    expect(run('solvent-as-product')).toEqual(expect.arrayContaining(['split-peak', 'missing-solvent']))
    expect(run('missing-product')).toContain('missing-product')
    expect(run('split-peak')).toContain('split-peak')
  })

  it('a swapped pair shows up as swapped mole %', () => {
    const sim = simulatePeakTable({ seed: 5, windows, distribution, areaNoise: 0, fault: 'swapped-peaks', faultProduct: 0 })
    const r = assignPeaks(parsePeakTable(sim.text).peaks, windows)
    expect(r.molePercents[0]!.percent).toBeCloseTo(45, 1)
    expect(r.molePercents[1]!.percent).toBeCloseTo(25, 1)
  })
})

describe('parseTrace and sniffUpload', () => {
  const trace = simulateTrace({
    seed: 3,
    peaks: [{ retentionTime: 2, area: 1, sigma: 0.02 }],
    duration: 5, points: 3000, baseline: { offset: 2, slope: 0.5 }, noise: 0.01,
  })

  it('reads a time/signal CSV in minutes', () => {
    const r = parseTrace(formatTrace(trace))
    expect(r.errors).toEqual([])
    expect(r.time).toHaveLength(3000)
    expect(r.time[2999]).toBeCloseTo(5, 4)
    expect(r.signal[1500]).toBeCloseTo(trace.signal[1500]!, 3)
    expect(r.meta!.headerRow).toBe(1)
  })

  it('reads seconds, decimal commas, a preamble and a BOM', () => {
    const text = `\uFEFFDetector A\nRate: 10 Hz\n\n${formatTrace(trace, { seconds: true, decimalComma: true })}`
    const r = parseTrace(text)
    expect(r.errors).toEqual([])
    expect(r.meta).toMatchObject({ timeUnit: 's', decimalComma: true, delimiter: ';' })
    expect(r.time[2999]).toBeCloseTo(5, 4)
  })

  it('reads a headerless tab file and detects undeclared seconds', () => {
    const text = trace.time.map((t, i) => `${(t * 60).toFixed(3)}\t${trace.signal[i]!.toFixed(4)}`).join('\n')
    const r = parseTrace(text)
    expect(r.meta).toMatchObject({ headerRow: null, timeUnit: 's', timeUnitSource: 'detected' })
    expect(r.time[2999]).toBeCloseTo(5, 4)
  })

  it('refuses time that goes backwards and non-numeric rows, with the row', () => {
    const lines = formatTrace(trace).split('\n')
    const back = [...lines]
    back[100] = `0.001,${trace.signal[99]}`
    expect(parseTrace(back.join('\n')).errors[0]).toMatchObject({ code: 'non-monotonic-time', row: 101 })
    const bad = [...lines]
    bad[50] = '0.0816,n/a'
    expect(parseTrace(bad.join('\n')).errors[0]).toMatchObject({ code: 'non-numeric', row: 51 })
    expect(parseTrace('').errors[0]!.code).toBe('empty')
    expect(parseTrace('Time,Signal\n1,2\n2,3\n3,4\n').errors[0]!.code).toBe('too-few-points')
  })

  it('tells traces from peak tables', () => {
    expect(sniffUpload(formatTrace(trace)).kind).toBe('trace')
    expect(sniffUpload(formatTrace(trace, { decimalComma: true, seconds: true })).kind).toBe('trace')
    expect(sniffUpload(fixture('valid-09-aligned.txt')).kind).toBe('peak-table')
    expect(sniffUpload(fixture('valid-05-seconds-undeclared.csv')).kind).toBe('peak-table')
    expect(sniffUpload(fixture('invalid-05-no-area-column.csv')).kind).toBe('peak-table')
    expect(sniffUpload('hello\nworld\n').kind).toBe('unknown')
    expect(sniffUpload('Time,Signal\n1,2\n2,3\n3,1\n').kind).not.toBe('trace')
  })
})
