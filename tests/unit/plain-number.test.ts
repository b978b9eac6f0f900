import { afterEach, describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { general } from './fixtures/general-path'
import { parsePeakTable, parseTrace, sniffUpload } from '../../shared/utils/chromatography'
import { type ColumnStyle, readCell, tallyColumn } from '../../shared/utils/lib/number-text'
import { fastPaths, plainKind, readPlain, readScanned, readingAt, scanColumn, tallyCells } from '../../shared/utils/lib/plain-number'
import { splitCells, splitTexts } from '../../shared/utils/lib/table-text'

// The readers' shortcuts (plain decimals read as written, cells split without positions, rows of
// bare numbers spared the word tests) must give exactly what the general path gives. The general
// path is the reference: each check reads the same cells or files both ways and compares.

afterEach(() => { fastPaths.enabled = true })

const STYLES: ColumnStyle[] = (['.', ',', null] as const).flatMap((decimal) => [false, true].flatMap((mixed) =>
  [false, true].map((clock) => ({ decimal, mixed, clock, evidence: 'column' as const }))))

const digits = (min: number, max: number) => fc.stringMatching(new RegExp(`^[0-9]{${min},${max}}$`))

/** Number cells as exports write them: signs, both marks, thousands groups, exponents, m:ss, quotes, %, junk. */
const cell = fc.oneof(
  fc.tuple(fc.constantFrom('', '', '-', '+', '\u2212'), digits(0, 7), fc.constantFrom('', '.', ','), digits(0, 5))
    .map(([sign, whole, mark, fraction]) => `${sign}${whole}${mark}${fraction}`),
  fc.tuple(fc.integer({ min: 1, max: 999 }), fc.array(digits(3, 3), { minLength: 1, maxLength: 3 }),
    fc.constantFrom(',', '.', ' ', '\u00a0', '\''), fc.constantFrom('', '.5', ',25', '.125'))
    .map(([head, groups, sep, tail]) => `${head}${sep}${groups.join(sep)}${tail}`),
  fc.tuple(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.constantFrom('', 'e3', 'E-2', 'e+05'))
    .map(([v, e]) => `${v}${e}`),
  fc.tuple(fc.integer({ min: 0, max: 59 }), fc.integer({ min: 0, max: 59 }), fc.constantFrom('', '.5', ',25'))
    .map(([m, s, f]) => `${m}:${String(s).padStart(2, '0')}${f}`),
  fc.tuple(digits(1, 4), fc.constantFrom('.', ','), digits(1, 4), fc.constantFrom('"', ' ', '%', ' %'))
    .map(([a, m, b, wrap]) => (wrap === '"' ? `"${a}${m}${b}"` : wrap === ' ' ? ` ${a}${m}${b} ` : `${a}${m}${b}${wrap}`)),
  digits(20, 30),
  fc.constantFrom('', '-', '.5', '5.', '1.2.3', 'abc', 'n/a', '0.000', '000', '-0', '007.250', '1e400', '∞'),
)

describe('plain decimals read the way the general path reads them', () => {
  it('takes the shortcut for plain cells and leaves the rest to the general path', () => {
    const point: ColumnStyle = { decimal: '.', mixed: false, clock: false, evidence: 'column' }
    expect(readPlain('3.4321', point)).toBe(3.4321)
    expect(readPlain('-12', point)).toBe(-12)
    expect(readPlain('1,5', point)).toBeUndefined()
    expect(readPlain('1e3', point)).toBeUndefined()
    expect(readPlain(' 1.5', point)).toBeUndefined()
    expect(readPlain('1.5', { ...point, decimal: ',' })).toBeUndefined()
    expect(readPlain('15', { ...point, decimal: ',' })).toBe(15)
    expect(readPlain('15', { ...point, clock: true })).toBeUndefined()
    expect(plainKind('1.234')).not.toBe(plainKind('1.2345'))
  })

  it('gives readCell\'s number for every cell and column style it reads', () => {
    fc.assert(fc.property(cell, fc.constantFrom(...STYLES), (text, style) => {
      const fast = readPlain(text, style)
      if (fast === undefined) return
      const read = readCell(text, style)
      expect(read && 'value' in read ? read.value : read).toBe(fast)
    }), { numRuns: 3000 })
  })

  it('counts a column as tallyColumn counts it, and reads it exactly as readCell does', () => {
    fc.assert(fc.property(fc.array(cell, { maxLength: 30 }), fc.constantFrom(...STYLES), (cells, style) => {
      expect(tallyCells(cells)).toEqual(tallyColumn(cells))
      const scanned = scanColumn(cells)
      expect(scanned.tally).toEqual(tallyColumn(cells))
      const reads = readScanned(scanned, style)
      expect(cells.map((_, i) => readingAt(scanned, reads, i))).toEqual(cells.map((c) => readCell(c, style)))
      // The plain numbers are the readings' values, and only where readCell reads a number.
      reads.plain.forEach((v, i) => { if (!Number.isNaN(v)) expect(v).toBe((readCell(cells[i]!, style) as { value: number }).value) })
    }), { numRuns: 1500 })
  })
})

describe('cells split without positions', () => {
  it('are the texts splitCells gives', () => {
    const line = fc.array(fc.oneof(cell, fc.constantFrom('"a;b"', '"x ""y"""', '\t3.5 ', '\u00a07\u00a0', '\u2003', '')), { maxLength: 8 })
    fc.assert(fc.property(line, fc.constantFrom(',', ';', '\t', '|', 'whitespace'), (cells, d) => {
      const text = cells.join(d === 'whitespace' ? '   ' : d)
      expect(splitTexts(text, d as ',')).toEqual(splitCells(text, d as ',').map((c) => c.text))
    }), { numRuns: 1500 })
  })
})

const LINE_ENDS = ['\n', '\r\n', '\r'] as const

/** One column's numbers written one way: plain, with decimal commas, grouped, with exponents, or quoted. */
const writer = fc.constantFrom(
  (v: number) => String(v),
  (v: number) => String(v).replace('.', ','),
  (v: number) => v.toLocaleString('en-US', { maximumFractionDigits: 3 }),
  (v: number) => v.toLocaleString('de-DE', { maximumFractionDigits: 3 }),
  (v: number) => v.toExponential(3),
  (v: number) => `"${v}"`,
  (v: number) => v.toFixed(3),
)

const peakTableFile = fc.record({
  delimiter: fc.constantFrom(',', ';', '\t'),
  end: fc.constantFrom(...LINE_ENDS),
  bom: fc.boolean(),
  rtHeader: fc.constantFrom('RT', 'Ret. Time (min)', 'Retention time [s]', 'tR'),
  withPercent: fc.boolean(),
  rt: writer,
  area: writer,
  rows: fc.array(fc.record({ rt: fc.double({ min: 0.1, max: 20, noNaN: true }), area: fc.double({ min: 0, max: 2e6, noNaN: true }) }),
    { minLength: 1, maxLength: 40 }),
  extra: fc.constantFrom('', 'Total', 'Printed by: lab 3', '∑ 12345', '', '-1.5', 'Page 1 of 1'),
}).map((f) => {
  const header = ['Peak', f.rtHeader, 'Area', ...(f.withPercent ? ['Area %'] : [])].join(f.delimiter)
  const total = f.rows.reduce((s, r) => s + r.area, 0)
  const lines = f.rows.map((r, i) => [String(i + 1), f.rt(+r.rt.toFixed(4)), f.area(+r.area.toFixed(2)),
    ...(f.withPercent ? [(total > 0 ? (r.area / total) * 100 : 0).toFixed(2)] : [])].join(f.delimiter))
  if (f.extra) lines.push(f.extra.includes(' ') ? f.extra : [f.extra, '', String(total)].join(f.delimiter))
  return `${f.bom ? '\uFEFF' : ''}${[header, ...lines].join(f.end)}${f.end}`
})

const traceFile = fc.record({
  delimiter: fc.constantFrom(',', ';', '\t', ' '),
  end: fc.constantFrom(...LINE_ENDS),
  bom: fc.boolean(),
  header: fc.boolean(),
  time: writer,
  signal: writer,
  step: fc.double({ min: 0.0005, max: 0.05, noNaN: true }),
  points: fc.integer({ min: 5, max: 260 }),
  seed: fc.integer(),
}).map((f) => {
  const rows: string[] = f.header ? ['Time (min)' + f.delimiter + 'Signal (pA)'] : []
  for (let i = 0; i < f.points; i++) {
    const t = +(i * f.step).toFixed(5)
    const y = +(5 + 200 * Math.exp(-(((i - f.points / 2) / 8) ** 2)) + Math.sin(i * 12.9898 + f.seed)).toFixed(4)
    rows.push(f.time(t) + f.delimiter + f.signal(y))
  }
  return `${f.bom ? '\uFEFF' : ''}${rows.join(f.end)}${f.end}`
})

describe('whole files read the same with and without the shortcuts', () => {
  it('peak tables: the same peaks, warnings, errors and layout', () => {
    fc.assert(fc.property(peakTableFile, (text) => {
      expect(parsePeakTable(text)).toEqual(general(() => parsePeakTable(text)))
    }), { numRuns: 400 })
  })

  it('traces: the same points, warnings, errors and layout, and the same verdict on what the file is', () => {
    fc.assert(fc.property(traceFile, (text) => {
      expect(parseTrace(text)).toEqual(general(() => parseTrace(text)))
      expect(sniffUpload(text)).toEqual(general(() => sniffUpload(text)))
    }), { numRuns: 300 })
  })

  it('the bench\'s own shapes take the shortcut and read every row', () => {
    const table = ['Peak,Ret. Time (min),Area,Area %', '1,0.5000,1234.5,', '2,0.5019,1000.0,', '3,0.5038,1.234,'].join('\r\n')
    const read = parsePeakTable(`\uFEFF${table}\r\n`)
    expect(read.errors).toEqual([])
    expect(read.peaks.map((p) => [p.retentionTime, p.area])).toEqual([[0.5, 1234.5], [0.5019, 1000], [0.5038, 1.234]])
    expect(read).toEqual(general(() => parsePeakTable(`\uFEFF${table}\r\n`)))
  })
})
