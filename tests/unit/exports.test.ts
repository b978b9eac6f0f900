import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { assignPeaks, parsePeakTable, type AssignOptions, type ProductWindow } from '../../shared/utils/chromatography'

// Invented exports in layouts of our own making (tests/unit/fixtures/exports): each lists the
// numbers its file holds, and the mole % computed here from those numbers must come back out of
// the parser and assignPeaks. The runs and the retention windows are invented demo data.
const read = (name: string) => readFileSync(fileURLToPath(new URL(`./fixtures/exports/${name}`, import.meta.url)), 'utf8')

const windowsOf = (rows: [string, number, number][]): ProductWindow[] =>
  rows.map(([productSmiles, rtMin, rtMax]) => ({ productSmiles, rtMin, rtMax }))

const WINDOWS: Record<string, { products: ProductWindow[], options: AssignOptions }> = {
  // 1-chlorobutane + Cl: the four dichlorobutanes.
  butane: {
    products: windowsOf([['ClC(Cl)CCC', 3.3, 3.55], ['ClCC(Cl)CC', 3.8, 4.05], ['ClCCC(Cl)C', 4.4, 4.65], ['ClCCCCCl', 5.6, 5.85]]),
    options: { solvent: { rtMin: 1.2, rtMax: 1.6 }, startingMaterial: { rtMin: 2.1, rtMax: 2.45 } },
  },
  // 2,3-dimethylbutane + Cl: tertiary and primary monochlorides.
  dmb: {
    products: windowsOf([['CC(C)C(C)(C)Cl', 2.75, 3.0], ['CC(C)C(C)CCl', 3.35, 3.6]]),
    options: { solvent: { rtMin: 1.0, rtMax: 1.3 }, startingMaterial: { rtMin: 1.6, rtMax: 1.9 } },
  },
  propane: {
    products: windowsOf([['CC(C)Cl', 1.6, 1.9], ['CCCCl', 2.0, 2.3]]),
    options: { solvent: { rtMin: 0.7, rtMax: 1.0 } },
  },
  methylbutane: {
    products: windowsOf([['ClCC(C)CC', 2.2, 2.4], ['CC(C)(Cl)CC', 2.5, 2.7], ['CC(C)C(C)Cl', 2.9, 3.1], ['CC(C)CCCl', 3.3, 3.5]]),
    options: { solvent: { rtMin: 0.7, rtMax: 1.0 } },
  },
}

interface Good {
  file: string
  windows: keyof typeof WINDOWS
  rts: number[]
  areas: number[]
  heights?: boolean
  percent?: boolean
  areaSource?: 'area' | 'areaPercent'
  warning?: RegExp
}

const GOOD: Good[] = [
  { file: '01-tab-comma-thousands.tsv', windows: 'butane', rts: [1.412, 2.287, 3.432, 3.939, 4.532, 5.716], areas: [2418337, 612904, 987, 45769, 96376, 48847] },
  { file: '02-semicolon-dot-thousands.csv', windows: 'butane', rts: [1.412, 2.287, 3.432, 3.939, 4.532, 5.716], areas: [2418337, 612904, 987, 45769, 96376, 48847] },
  { file: '03-csv-quoted-grouped.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '04-semicolon-space-thousands.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '05-semicolon-nbsp-thousands.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '06-csv-apostrophe-thousands.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '07-aligned-report-stars-footer.txt', windows: 'butane', rts: [1.412, 2.287, 3.432, 3.939, 4.532, 5.716], areas: [2418337, 612904, 987, 45769, 96376, 48847], warning: /End of Report/ },
  { file: '08-aligned-equals-footer.txt', windows: 'dmb', rts: [1.152, 1.744, 2.861, 3.472, 4.905], areas: [3120554, 508812, 14380.2, 21907.7, 611.3], warning: /End of Report/ },
  { file: '09-aligned-printed-page-signature.txt', windows: 'dmb', rts: [1.152, 1.744, 2.861, 3.472, 4.905], areas: [3120554, 508812, 14380.2, 21907.7, 611.3], heights: true, warning: /Page 1 of 1/ },
  { file: '10-german-semicolon.csv', windows: 'butane', rts: [3.441, 3.951, 4.547, 5.731], areas: [2210, 52310, 110452, 57012], heights: true, percent: true },
  { file: '11-german-aligned.txt', windows: 'butane', rts: [3.441, 3.951, 4.547, 5.731], areas: [2210, 52310, 110452, 57012], heights: true, warning: /totals row/ },
  { file: '12-french-semicolon.csv', windows: 'propane', rts: [0.842, 1.741, 2.152], areas: [1502334, 30544, 26118], heights: true, percent: true },
  { file: '13-french-tr-abbreviation.csv', windows: 'propane', rts: [0.84, 1.74, 2.15], areas: [1502334, 30544, 26118], heights: true },
  { file: '14-spanish-semicolon.csv', windows: 'methylbutane', rts: [0.901, 2.301, 2.612, 2.995, 3.402], areas: [880112.4, 12044.1, 10023.9, 15233, 6021.7], heights: true, percent: true },
  { file: '15-italian-tab.tsv', windows: 'methylbutane', rts: [0.901, 2.301, 2.612, 2.995, 3.402], areas: [880112.4, 12044.1, 10023.9, 15233, 6021.7], heights: true },
  { file: '16-portuguese-semicolon.csv', windows: 'dmb', rts: [1.152, 1.744, 2.861, 3.472, 4.905], areas: [3120554, 508812, 14380.2, 21907.7, 611.3], percent: true },
  { file: '17-dutch-semicolon.csv', windows: 'dmb', rts: [1.152, 1.744, 2.861, 3.472, 4.905], areas: [3120554, 508812, 14380.2, 21907.7, 611.3], heights: true },
  { file: '18-polish-semicolon.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6], heights: true },
  { file: '19-tr-slash-units.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6], heights: true },
  { file: '20-peak-rt-bracket-units.tsv', windows: 'propane', rts: [0.842, 1.741, 2.152], areas: [1502334, 30544, 26118], percent: true },
  { file: '21-parenthesised-units.csv', windows: 'methylbutane', rts: [0.901, 2.301, 2.612, 2.995, 3.402], areas: [880112.4, 12044.1, 10023.9, 15233, 6021.7], heights: true },
  { file: '22-comma-unit-headers.csv', windows: 'methylbutane', rts: [0.901, 2.301, 2.612, 2.995, 3.402], areas: [880.1124, 12.0441, 10.0239, 15.233, 6.0217], percent: true },
  { file: '23-area-percent-only.csv', windows: 'butane', rts: [3.441, 3.951, 4.547, 5.731], areas: [1, 23.56, 49.76, 25.68], areaSource: 'areaPercent' },
  { file: '24-area-percent-only-german.csv', windows: 'dmb', rts: [2.848, 3.461], areas: [39.7, 60.3], areaSource: 'areaPercent' },
  { file: '25-area-percent-only-aligned.txt', windows: 'propane', rts: [0.842, 1.741, 2.152], areas: [96.365, 1.959, 1.675], areaSource: 'areaPercent' },
  { file: '26-mmss-tenths.tsv', windows: 'butane', rts: [1.398333333, 2.301666667, 3.418333333, 3.926666667, 4.518333333, 5.701666667], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '27-mmss-whole-seconds.csv', windows: 'butane', rts: [1.4, 2.3, 3.416666667, 3.933333333, 4.516666667, 5.7], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '28-seconds-declared.csv', windows: 'dmb', rts: [1.152, 1.744, 2.861, 3.472, 4.905], areas: [3120554, 508812, 14380.2, 21907.7, 611.3] },
  { file: '29-seconds-undeclared-grouped.csv', windows: 'butane', rts: [1.412, 2.287, 3.432, 3.939, 4.532, 5.716], areas: [2418337, 612904, 987, 45769, 96376, 48847], warning: /read as seconds/ },
  { file: '30-milliseconds.csv', windows: 'propane', rts: [0.842, 1.741, 2.152], areas: [1502334, 30544, 26118] },
  { file: '31-preamble-units-row.csv', windows: 'methylbutane', rts: [0.901, 2.301, 2.612, 2.995, 3.402], areas: [14668.54, 200.735, 167.065, 253.883, 100.362], heights: true },
  { file: '32-unlabelled-totals.csv', windows: 'dmb', rts: [1.152, 1.744, 2.861, 3.472, 4.905], areas: [3120554, 508812, 14380.2, 21907.7, 611.3], warning: /totals row/ },
  { file: '33-bom-crlf.tsv', windows: 'butane', rts: [3.441, 3.951, 4.547, 5.731], areas: [2210, 52310, 110452, 57012] },
  { file: '34-page-break-reprinted-header.txt', windows: 'butane', rts: [1.412, 2.287, 3.432, 3.939, 4.532, 5.716], areas: [2418337, 612904, 987, 45769, 96376, 48847], warning: /Page 1 of 2/ },
  { file: '35-two-signals.csv', windows: 'propane', rts: [0.842, 1.741, 2.152], areas: [1502334, 30544, 26118], warning: /second table/ },
  { file: '36-semicolon-quoted.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450.5, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '37-quoted-names-with-commas.csv', windows: 'dmb', rts: [2.848, 3.461], areas: [9876.5, 15012.3] },
  { file: '38-scientific-notation.csv', windows: 'butane', rts: [1.398, 2.301, 3.418, 3.927, 4.519, 5.702], areas: [1987450, 401233.8, 1523.4, 38214.9, 80117.2, 41876.6] },
  { file: '39-csv-space-grouped.csv', windows: 'methylbutane', rts: [0.901, 2.301, 2.612, 2.995, 3.402], areas: [880112.4, 12044.1, 10023.9, 15233, 6021.7] },
  { file: '40-tab-trailing-columns.tsv', windows: 'propane', rts: [0.842, 1.741, 2.152], areas: [1502334, 30544, 26118] },
  { file: '41-grouping-from-five-digits.csv', windows: 'dmb', rts: [2.848, 3.461, 3.912], areas: [9876.5, 15012.3, 120450] },
  { file: '42-south-asian-grouping.csv', windows: 'butane', rts: [1.412, 2.287, 3.432, 3.939, 4.532, 5.716], areas: [2418337, 612904, 987, 45769, 96376, 48847] },
  { file: '43-pipe-ruled.txt', windows: 'dmb', rts: [1.152, 1.744, 2.861, 3.472, 4.905], areas: [3120554, 508812, 14380.2, 21907.7, 611.3], percent: true },
  { file: '44-german-trailing-semicolons.csv', windows: 'butane', rts: [3.441, 3.951, 4.547, 5.731], areas: [2210, 52310, 110452, 57012], warning: /totals row/ },
  { file: '45-aligned-decimal-comma-area-percent.txt', windows: 'propane', rts: [0.842, 1.741, 2.152], areas: [1502334, 30544, 26118], percent: true },
]

/** Mole % straight from the listed numbers: the area in each window over the area in all windows. */
function molePercentFrom(rts: number[], areas: number[], products: ProductWindow[]): number[] {
  const inWindow = products.map((w) => rts.reduce((s, rt, i) => (rt >= w.rtMin && rt <= w.rtMax ? s + areas[i]! : s), 0))
  const total = inWindow.reduce((s, a) => s + a, 0)
  return inWindow.map((a) => (a / total) * 100)
}

describe('invented exports read right', () => {
  it('holds at least 40 layouts', () => {
    expect(GOOD.length).toBeGreaterThanOrEqual(40)
  })

  it.each(GOOD)('$file', (f) => {
    const r = parsePeakTable(read(f.file))
    expect(r.errors).toEqual([])
    expect(r.peaks.map((p) => p.retentionTime)).toEqual(f.rts.map((v) => expect.closeTo(v, 6)))
    expect(r.peaks.map((p) => p.area)).toEqual(f.areas.map((v) => expect.closeTo(v, 6)))
    expect(r.peaks.every((p) => (p.height !== undefined) === !!f.heights)).toBe(true)
    if (f.percent) expect(r.peaks.every((p) => typeof p.areaPercent === 'number')).toBe(true)
    expect(r.meta!.areaSource).toBe(f.areaSource ?? 'area')
    if (f.warning) expect(r.warnings.join(' ')).toMatch(f.warning)
    const { products, options } = WINDOWS[f.windows]!
    const expected = molePercentFrom(f.rts, f.areas, products)
    const got = assignPeaks(r.peaks, products, options).molePercents
    expect(got.map((m) => m.percent)).toEqual(expected.map((v) => expect.closeTo(v, 6)))
  })

  it('reads the reported tab and semicolon files as the 0.5 % of 1,1-dichlorobutane their numbers give', () => {
    for (const file of ['01-tab-comma-thousands.tsv', '02-semicolon-dot-thousands.csv']) {
      const mole = assignPeaks(parsePeakTable(read(file)).peaks, WINDOWS.butane!.products).molePercents
      // 987 / (987 + 45769 + 96376 + 48847) = 0.514 %
      expect(mole[0]!.percent).toBeCloseTo(0.514, 3)
    }
  })
})

const BAD: [string, number, string][] = [
  ['bad-01-ambiguous-thousands.csv', 3, 'ambiguous-number'],
  ['bad-02-inconsistent-grouping.tsv', 3, 'ambiguous-number'],
  ['bad-03-area-1e308.csv', 3, 'out-of-range'],
  ['bad-04-infinity.csv', 3, 'non-numeric'],
  ['bad-05-nan.csv', 2, 'non-numeric'],
  ['bad-06-fifty-hours.csv', 3, 'out-of-range'],
  ['bad-07-mixed-decimal-marks.csv', 3, 'non-numeric'],
  ['bad-08-text-between-peaks.csv', 3, 'non-numeric'],
  ['bad-09-mmss-mixed-with-plain.tsv', 3, 'non-numeric'],
  ['bad-10-area-percent-above-100.csv', 3, 'out-of-range'],
  ['bad-11-heights-only.csv', 1, 'no-area-column'],
  ['bad-12-unquoted-decimal-commas.csv', 2, 'misaligned'],
  ['bad-13-overflowing-exponent.csv', 3, 'non-numeric'],
  ['bad-14-ambiguous-area-percent-only.csv', 2, 'ambiguous-number'],
]

describe('invented exports refused by row', () => {
  it.each(BAD)('%s is refused at row %i (%s)', (file, row, code) => {
    const r = parsePeakTable(read(file))
    expect(r.peaks).toEqual([])
    expect(r.errors[0]).toMatchObject({ row, code })
    expect(r.errors[0]!.message).toMatch(new RegExp(`^Row ${row}\\b`))
  })
})
