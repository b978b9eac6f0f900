import { describe, expect, it } from 'vitest'
import Papa from 'papaparse'
import { neutraliseCell, toSafeCsv } from '../../shared/utils/csv-safe'

// OWASP, "CSV Injection": cells beginning with = + - @ tab CR LF must not be read as formulas.
describe('neutraliseCell', () => {
  it.each(['=cmd|\' /C calc\'!A0', '+1+2', '-2+3', '@SUM(A1)', '\tx', '\rx', '\nx', '=HYPERLINK("http://x.example","y")'])('prefixes %j with an apostrophe', (value) => {
    expect(neutraliseCell(value)).toBe(`'${value}`)
  })

  it('leaves ordinary text and numbers alone (negative numbers stay numbers)', () => {
    expect(neutraliseCell('Ada Quill')).toBe('Ada Quill')
    expect(neutraliseCell(-3.5)).toBe(-3.5)
    expect(neutraliseCell(0)).toBe(0)
    expect(neutraliseCell(null)).toBeNull()
    expect(neutraliseCell(Number.NaN)).toBeNull()
  })
})

describe('toSafeCsv', () => {
  it('round-trips through a CSV parser with the dangerous cell neutralised and numbers unquoted', () => {
    const csv = toSafeCsv(['name', 'score'], [['=cmd|\' /C calc\'!A0', 17], ['Plain, with comma', -2]])
    expect(csv.startsWith('\uFEFF')).toBe(true)
    expect(csv).toContain('\r\n')
    expect(csv).toMatch(/,17\r\n/)
    const parsed = Papa.parse<string[]>(csv.slice(1).trim()).data
    expect(parsed).toEqual([['name', 'score'], ['\'=cmd|\' /C calc\'!A0', '17'], ['Plain, with comma', '-2']])
  })
})
