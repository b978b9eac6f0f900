import { afterEach, describe, expect, it, vi } from 'vitest'
import fc from 'fast-check'
import { general } from './fixtures/general-path'
import { parsePeakTable } from '../../shared/utils/chromatography'
import { fastPaths } from '../../shared/utils/lib/plain-number'
import { evaluateRun, practicalChemistryOf } from '../../shared/utils/submission'

// The fast pass for tables of plain rows (plain-table.ts) must give exactly what the general
// path gives: the same peaks, warnings, errors and layout from parsePeakTable, and the same run
// from evaluateRun. Generated tables mix plain rows (which the pass reads) with every kind of
// line it must hand back: quotes, decimal commas, groups, exponents, m:ss, %, units rows,
// furniture, totals, blank lines, bad and out-of-order rows.

// How many tables the fast pass read, so that a pass that always gave up cannot look correct.
const taken = vi.hoisted(() => ({ tables: 0 }))
vi.mock('../../shared/utils/lib/plain-table', async (importOriginal) => {
  const original = await importOriginal<typeof import('../../shared/utils/lib/plain-table')>()
  return {
    ...original,
    readPlainTable: (...args: Parameters<typeof original.readPlainTable>) => {
      const read = original.readPlainTable(...args)
      if (read) taken.tables++
      return read
    },
  }
})

afterEach(() => { fastPaths.enabled = true })

/** What a call gave, a thrown error included (its class, message and rows). */
function outcome<T>(read: () => T): T | { thrown: string, message: string, rows: unknown } {
  try {
    return read()
  } catch (e) {
    const error = e as Error & { rows?: unknown }
    return { thrown: error.name, message: error.message, rows: error.rows }
  }
}

// 2,3-dimethylbutane photochlorinated, with the demo seed's windows (an invented demo column) and
// Cl2/light reactivities 1 : 3.8 : 5.0 per H at 25 °C (NCERT Chemistry class XI worked example).
const chemistry = practicalChemistryOf('CC(C)C(C)C', { halogen: 'Cl', rPrimary: 1, rSecondary: 3.8, rTertiary: 5 }, [
  { kind: 'solvent', productSmiles: null, rtMin: 1.2, rtMax: 1.6, responseFactor: 1 },
  { kind: 'starting-material', productSmiles: null, rtMin: 1.8, rtMax: 2.05, responseFactor: 1 },
  { kind: 'product', productSmiles: 'CC(C)C(C)(C)Cl', rtMin: 3.0, rtMax: 3.25, responseFactor: 1 },
  { kind: 'product', productSmiles: 'CC(C)C(C)CCl', rtMin: 3.5, rtMax: 3.75, responseFactor: 1 },
])

type Delimiter = ',' | ';' | '\t' | '|' | 'aligned'

/** Header rows as exports write them; the first cell is sometimes blank or a number sign. */
const HEADERS = [
  ['Peak', 'Ret. Time (min)', 'Area', 'Area %'],
  ['RT', 'Area'],
  ['#', 'Retention time [s]', 'Height', 'Area'],
  ['Peak', 'tR', 'Area %'],
  ['', 'RT [min]', 'Area', 'Height'],
  ['No.', 'RetTime', 'Area', 'Area%', 'Name'],
]

/**
 * A plain number written a few ways: fixed digits, an integer, leading zeros, "1.234"-like
 * (a point that could group thousands), long digit strings, JavaScript's own shortest form.
 */
const plainText = (v: number, style: number) => {
  switch (style) {
    case 0: return v.toFixed(4)
    case 1: return v.toFixed(1)
    case 2: return String(Math.round(v))
    case 3: return `00${v.toFixed(3)}`
    case 4: return (1 + (v % 998)).toFixed(3)
    case 5: return `${Math.round(v)}123456789012.5`
    default: return String(v)
  }
}
// Whole seconds only where the gaps (over a second) keep them apart.
const TIME_STYLES = [0, 3, 4, 6, 2]

/** Cells the fast pass must hand to the general path (or, in a column it does not read, ignore). */
const ODD_CELLS = [
  '"1.5"', '1,5', '1,234.5', '1.234,5', '1e3', '2.5E-2', '3:12', '12 %', ' 4.5', '4.5 ', '-', '.5', '5.', '1.2.3',
  '-0', '-2.5', '', 'n/a', '1 234', '\u22122', '+3', '9'.repeat(30),
]

/** Whole lines the fast pass must hand back: furniture, totals, units and text. */
const ODD_LINES = ['Page 1 of 2', 'Printed: lab 3', 'End of report', 'Total', 'Sum', '∑ 100', '---', 'min', 'Name only', '\f']

/**
 * Rows made of plain cells that the general path still refuses, warns about or skips: the fast
 * pass must see each of them and give up (or skip the blank ones) exactly where it should.
 */
const EDGE_ROWS = [
  'repeat-time', 'earlier-time', 'negative-area', 'huge-area', 'empty-time', 'empty-area', 'short-row', 'long-row',
  'bare-delimiters', 'blank', 'spaces', 'extra-too-large', 'extra-negative', 'extra-empty', 'negative-time',
] as const

const row = fc.record({
  gap: fc.double({ min: 0.02, max: 0.4, noNaN: true }),
  area: fc.double({ min: 0, max: 2e6, noNaN: true }),
  extra: fc.double({ min: 0, max: 100, noNaN: true }),
  roll: fc.double({ min: 0, max: 1, noNaN: true }),
  odd: fc.oneof(
    fc.record({ cell: fc.constantFrom(...ODD_CELLS), column: fc.nat(4) }),
    fc.record({ line: fc.constantFrom(...ODD_LINES) }),
  ),
})

const table = fc.record({
  delimiter: fc.constantFrom<Delimiter>(',', ';', '\t', '|', 'aligned'),
  end: fc.constantFrom('\n', '\r\n', '\r'),
  bom: fc.boolean(),
  header: fc.constantFrom(...HEADERS),
  styles: fc.array(fc.nat(6), { minLength: 5, maxLength: 5 }),
  start: fc.double({ min: 0, max: 3, noNaN: true }),
  // A share of rows are edge rows of one kind (plain cells, not a clean peak), a share odd ones.
  edgeRate: fc.constantFrom(0, 0, 0.05, 0.2),
  edge: fc.constantFrom(...EDGE_ROWS),
  oddRate: fc.constantFrom(0, 0, 0, 0, 0.05, 0.3),
  // Every number beside the time written "1.234" (a point that may group thousands).
  threeDecimals: fc.constantFrom(false, false, false, true),
  units: fc.constantFrom(null, null, null, null, ['', 'min', 'pA*s', '%', ''], ['', 's', 'mV.s', 'mV', '']),
  footer: fc.constantFrom(null, null, null, null, null, 'End of report', 'Total', 'Printed by, lab 3', '  '),
  // A whole file with decimal commas (semicolon and tab files only): the general path's.
  commas: fc.constantFrom(false, false, false, true),
  trailing: fc.constantFrom('', '\n', '\n\n', '\n  \n'),
  maxRows: fc.constantFrom(undefined, undefined, 4, 12),
  rows: fc.array(row, { minLength: 0, maxLength: 30 }),
})

type Table = typeof table extends fc.Arbitrary<infer T> ? T : never

const isTimeColumn = (name: string) => /time|tR|RT/i.test(name)

function write(t: Table): string {
  const d = t.delimiter
  const seconds = t.header.some((h) => h.includes('[s]'))
  const join = (cells: string[]) => (d === 'aligned' ? cells.map((c) => `${c.padEnd(15)} `).join('').trimEnd() : cells.join(d))
  const lines = [join(t.header)]
  if (t.units) lines.push(join(t.header.map((_, i) => t.units![i] ?? '')))
  let time = t.start
  let lastTime = ''
  t.rows.forEach((r, i) => {
    const edge = r.roll < t.edgeRate ? t.edge : null
    const odd = !edge && r.roll < t.edgeRate + t.oddRate ? r.odd : null
    if (edge === 'blank' || edge === 'spaces') lines.push(edge === 'blank' ? '' : '  \t ')
    if (edge === 'bare-delimiters') lines.push(d === 'aligned' ? '' : d.repeat(t.header.length - 1))
    if (odd && 'line' in odd) lines.push(odd.line)
    time += r.gap
    const area = edge === 'negative-area' ? -r.area - 1 : edge === 'huge-area' ? 2e15 : r.area
    const extra = edge === 'extra-too-large' ? 1e16 : edge === 'extra-negative' ? -r.extra : r.extra
    const cells = t.header.map((name, k) => {
      if (name === '') return ''
      if (name === 'Peak' || name === 'No.' || name === '#') return String(i + 1)
      if (name === 'Name') return i % 3 ? '' : `${i}`
      if (isTimeColumn(name)) {
        // Times keep their digits (a time rounded to a whole minute would repeat the one before).
        const style = TIME_STYLES[t.styles[0]! % TIME_STYLES.length]!
        const written = plainText(seconds ? time * 60 : time, style === 2 && !seconds ? 0 : style)
        if (edge === 'repeat-time' && lastTime) return lastTime
        if (edge === 'earlier-time') return plainText(seconds ? (time - 1) * 60 : time - 1, 0)
        if (edge === 'negative-time') return `-${written}`
        if (edge === 'empty-time') return ''
        lastTime = written
        return written
      }
      if (name === 'Area') return edge === 'empty-area' ? '' : plainText(area, t.threeDecimals ? 4 : t.styles[1]!)
      return edge === 'extra-empty' ? '' : plainText(extra, t.threeDecimals ? 4 : t.styles[k]!)
    })
    if (odd && 'cell' in odd) cells[odd.column % cells.length] = odd.cell
    if (edge === 'short-row') cells.splice(Math.max(2, cells.length - 2))
    if (edge === 'long-row') cells.push('7')
    if (t.commas && (d === ';' || d === '\t')) cells.forEach((c, k) => { cells[k] = c.replace('.', ',') })
    lines.push(join(cells))
  })
  if (t.footer) lines.push(t.footer)
  return `${t.bom ? '\uFEFF' : ''}${lines.join(t.end)}${t.trailing.replace(/\n/g, t.end)}`
}

describe('the fast pass reads plain tables exactly as the general path does', () => {
  it('parsePeakTable and evaluateRun give the same answers both ways, and the pass reads most plain tables', () => {
    let plainTables = 0
    let fastTables = 0
    fc.assert(fc.property(table, (t) => {
      const text = write(t)
      const plain = t.edgeRate === 0 && t.oddRate === 0 && !t.units && !t.footer && !t.commas && t.rows.length > 0
      if (plain) plainTables++
      const options = t.maxRows ? { maxRows: t.maxRows } : {}
      const before = taken.tables
      const fast = parsePeakTable(text, options)
      if (taken.tables > before) fastTables++
      expect(fast).toStrictEqual(general(() => parsePeakTable(text, options)))
      const run = () => evaluateRun({ text, ...chemistry })
      expect(outcome(run)).toStrictEqual(general(() => outcome(run)))
    }), { numRuns: 2000 })
    // A wholly plain table is given up only for what the pass leaves to the general path
    // (aligned columns left blank, a blank first header cell, long digit strings, a short maxRows...).
    expect(fastTables).toBeGreaterThan(plainTables / 2)
  })

  it('the bench\'s long table takes the pass and reads every row', () => {
    const lines = ['Peak,Ret. Time (min),Area,Area %']
    for (let i = 0; i < 5000; i++) lines.push(`${i + 1},${(0.5 + i * 0.0019).toFixed(4)},${(1000 + ((i * 7919) % 5000)).toFixed(1)},`)
    const text = `${lines.join('\n')}\n`
    taken.tables = 0
    const read = parsePeakTable(text)
    expect(taken.tables).toBe(1)
    expect(read.peaks).toHaveLength(5000)
    // Row 2 of the file is the first peak: 0.5000 min, area 1000.0 (i = 0).
    expect(read.peaks[0]).toStrictEqual({ retentionTime: 0.5, area: 1000, row: 2 })
    expect(read).toStrictEqual(general(() => parsePeakTable(text)))
    const run = evaluateRun({ text, ...chemistry })
    expect(run).toStrictEqual(general(() => evaluateRun({ text, ...chemistry })))
  })

  it('reads a number from its digits as Number() reads the text', () => {
    // Number() is the reference (ECMA-262 StringToNumber): the pass's quotient of exact integers must agree with it.
    const digits = fc.tuple(fc.stringMatching(/^[0-9]{1,2}$/), fc.stringMatching(/^[0-9]{1,9}$/), fc.stringMatching(/^[0-9]{1,10}$/))
    fc.assert(fc.property(digits, ([minutes, whole, fraction]) => {
      const rt = `${minutes}.${fraction}`
      const area = `${whole}.${fraction}`
      // Declared minutes: a time below 100 min is kept as written.
      const read = parsePeakTable(`RT (min),Area\n${rt},${area}\n`)
      expect(read.peaks[0]?.retentionTime).toBe(Number(rt))
      expect(read.peaks[0]?.area).toBe(Number(area))
    }), { numRuns: 2000 })
  })
})

/** Small tables of plain cells on which the general path refuses, warns or decides something. */
interface Case { name: string, text: string, options?: { maxRows: number }, expect: (read: ReturnType<typeof parsePeakTable>) => void }
const CASES: Case[] = [
  {
    // Whole seconds and "1.234" areas: nothing in the file says whether the point groups thousands.
    name: 'points that may group thousands, with no decimal shown anywhere',
    text: 'Retention time [s],Area,Height\n61,1.234,2.345\n75,2.345,3.456\n',
    expect: (read) => expect(read.errors[0]?.code).toBe('ambiguous-number'),
  },
  { name: 'a repeated time', text: 'RT,Area\n1.5,10\n1.5,20\n', expect: (read) => expect(read.errors[0]?.code).toBe('duplicate-rt') },
  { name: 'an earlier time', text: 'RT,Area\n1.5,10\n1.2,20\n', expect: (read) => expect(read.peaks).toHaveLength(2) },
  { name: 'more cells than the header', text: 'RT,Area\n1.5,10,7\n', expect: (read) => expect(read.errors[0]?.code).toBe('misaligned') },
  { name: 'bare delimiters between peaks', text: 'RT,Area\n1.5,10\n,\n1.6,20\n', expect: (read) => expect(read.errors[0]?.row).toBe(3) },
  {
    name: 'bare delimiters after the peaks', text: 'RT,Area\n1.5,10\n1.6,20\n,\n',
    expect: (read) => expect(read.warnings).toHaveLength(1),
  },
  { name: 'a blank first header cell', text: ',RT,Area\n,1.5,10\n,1.6,20\n', expect: (read) => expect(read.peaks).toHaveLength(2) },
  {
    name: 'more rows than allowed', text: 'RT,Area\n1,1\n2,2\n3,3\n', options: { maxRows: 2 },
    expect: (read) => expect(read.errors[0]?.code).toBe('too-many-rows'),
  },
  { name: 'a negative time', text: 'RT,Area\n-1.5,10\n', expect: (read) => expect(read.errors[0]?.code).toBe('negative-value') },
  { name: 'a negative area', text: 'RT,Area\n1.5,-10\n', expect: (read) => expect(read.errors[0]?.code).toBe('negative-value') },
  { name: 'an area past 1e15', text: 'RT,Area\n1.5,2000000000000000\n', expect: (read) => expect(read.errors[0]?.code).toBe('out-of-range') },
  { name: 'an area % past 100', text: 'RT,Area,Area %\n1.5,10,150\n', expect: (read) => expect(read.warnings).toHaveLength(1) },
  {
    name: 'a negative height in long digits', text: 'RT,Area,Height\n1.5,10,-0.020000000000000004\n',
    expect: (read) => expect(read.peaks[0]?.height).toBe(-0.020000000000000004),
  },
  { name: 'a missing area', text: 'RT,Area\n1.5,\n', expect: (read) => expect(read.errors[0]?.code).toBe('non-numeric') },
  { name: 'area % only', text: 'RT,Area %\n1.5,40\n2.5,60\n', expect: (read) => expect(read.meta?.areaSource).toBe('areaPercent') },
  { name: 'aligned columns left blank', text: 'RT      Area     Height\n1.5     10\n2.5     20       4\n', expect: () => {} },
  { name: 'undeclared seconds', text: 'RT,Area\n95,10\n120,20\n', expect: (read) => expect(read.meta?.timeUnit).toBe('s') },
  { name: 'CR line ends and a BOM', text: '\uFEFFRT;Area\r1.5;10\r\r2.5;20\r', expect: (read) => expect(read.peaks).toHaveLength(2) },
  { name: 'a line of tabs', text: 'RT\tArea\n1.5\t10\n\t\t\n2.5\t20\n', expect: (read) => expect(read.peaks).toHaveLength(2) },
]

describe('tables of plain cells that the general path must still decide', () => {
  it.each(CASES)('$name: the same answer both ways', ({ text, options, expect: check }) => {
    const read = parsePeakTable(text, options)
    expect(read).toStrictEqual(general(() => parsePeakTable(text, options)))
    check(read)
  })
})
