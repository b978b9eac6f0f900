import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { parsePeakTable, parseTrace, type ParsedPeakTable } from '../../shared/utils/chromatography'

const areas = (r: ParsedPeakTable) => r.peaks.map((p) => p.area)
const rts = (r: ParsedPeakTable) => r.peaks.map((p) => p.retentionTime)

describe('thousands separators and decimal marks', () => {
  it('reads a comma as a thousands separator when the retention times use decimal points', () => {
    const r = parsePeakTable('RT\tArea\n3.432\t987\n3.939\t45,769\n4.532\t96,376\n5.716\t48,847\n')
    expect(r.errors).toEqual([])
    expect(areas(r)).toEqual([987, 45769, 96376, 48847])
    expect(r.meta!.decimalMark).toBe('.')
  })

  it('reads a point as a thousands separator when the retention times use decimal commas', () => {
    const r = parsePeakTable('RT;Area\n3,430;987\n3,938;45.292\n4,529;96.376\n')
    expect(r.errors).toEqual([])
    expect(rts(r)).toEqual([3.43, 3.938, 4.529])
    expect(areas(r)).toEqual([987, 45292, 96376])
  })

  it('reads a comma as a decimal in a file that writes decimal commas elsewhere', () => {
    expect(areas(parsePeakTable('RT;Area\n3,43;987\n3,94;45,769\n'))).toEqual([987, 45.769])
    // The area % column alone can show the decimal mark.
    expect(areas(parsePeakTable('RT;Area;Area %\n3;987;2,1\n4;45,769;97,9\n'))).toEqual([987, 45.769])
    expect(areas(parsePeakTable('RT;Area;Area %\n3;987;2.1\n4;45,769;97.9\n'))).toEqual([987, 45769])
  })

  it('refuses a mark nothing in the file explains, naming both readings', () => {
    const r = parsePeakTable('RT [s];Area\n206;987\n236;45,769\n272;96,376\n')
    expect(r.peaks).toEqual([])
    expect(r.errors.map((e) => [e.row, e.code])).toEqual([[3, 'ambiguous-number'], [4, 'ambiguous-number']])
    expect(r.errors[0]!.message).toMatch(/^Row 3: the area 45,769 could be 45769 or 45\.769/)
    expect(parsePeakTable('RT [s];Area\n206;987\n236;45.292\n').errors[0]!.message).toMatch(/45\.292 could be 45292 or 45\.292/)
  })

  it('refuses a grouped-looking number in a column that writes long numbers without separators', () => {
    const r = parsePeakTable('RT\tArea\n3.432\t98765\n3.939\t45,769\n4.532\t96376\n')
    expect(r.errors).toEqual([expect.objectContaining({ row: 3, code: 'ambiguous-number', message: expect.stringMatching(/45,769 could be 45769 or 45\.769.*row 2 reads 98765/) })])
    // Four-digit values may stay ungrouped where five-digit ones are grouped ("1234" beside "12 345").
    expect(areas(parsePeakTable('RT;Area\n3,432;1234\n3,939;12.345\n'))).toEqual([1234, 12345])
    expect(parsePeakTable('RT,Area\n3.432,1234\n3.939,"9,876"\n').errors[0]).toMatchObject({ row: 3, code: 'ambiguous-number' })
  })

  it('reads space, no-break space, narrow space and apostrophe groups', () => {
    for (const sep of [' ', '\u00a0', '\u202f', '\'', '\u2019']) {
      expect(areas(parsePeakTable(`RT;Area\n2,514;15${sep}234,5\n3,087;1${sep}041${sep}020,1\n`))).toEqual([15234.5, 1041020.1])
    }
    expect(parsePeakTable('RT;Area\n2,514;15 23,5\n').errors[0]).toMatchObject({ row: 2, code: 'non-numeric' })
  })

  it('never reads a retention time as grouped thousands', () => {
    const r = parsePeakTable('RT;Area\n2.514;15234,5\n3.087;41020,1\n')
    expect(r.errors[0]).toMatchObject({ row: 2, code: 'ambiguous-number', message: expect.stringMatching(/2\.514 could be 2514 or 2\.514/) })
  })

  it('joins words of a name that land in one column of an aligned report', () => {
    const r = parsePeakTable('Pk   RT       Name                Area\n1    2.514    chloro butane A     15234.5\n2    3.087    chloro butane B     41020.1\n')
    expect(r.errors).toEqual([])
    expect(areas(r)).toEqual([15234.5, 41020.1])
  })

  it('keeps refusing a mark that contradicts its column (common practice: one mark per column)', () => {
    const r = parsePeakTable('RT;Area\n2,861;14380,2\n3.472;21907,7\n4,905;611,3\n')
    expect(r.errors).toEqual([expect.objectContaining({ row: 3, code: 'non-numeric', message: expect.stringMatching(/decimal commas elsewhere/) })])
  })

  // Grouping a column's numbers never changes what is read: the same run written plain, with
  // "1,234.5" grouping, with "1.234,5" grouping (semicolon file) and with space groups.
  // Peak sizes spread over orders of magnitude, as in a run with a solvent peak and traces.
  const sized = (maxDigits: number) => fc.integer({ min: 1, max: maxDigits })
    .chain((k) => fc.integer({ min: 10 ** (k - 1), max: 10 ** k - 1 }))
  const run = fc.array(fc.record({
    rt: fc.integer({ min: 5, max: 59_999 }).map((v) => v / 1000),
    area: sized(10).map((v) => v / 10),
    height: sized(8),
  }), { minLength: 1, maxLength: 12 }).map((rows) => rows.filter((r, i) => rows.findIndex((x) => x.rt === r.rt) === i))

  const group = (digits: string, sep: string) => digits.replace(/\B(?=(\d{3})+(?!\d))/g, sep)
  const write = (v: number, decimals: number, decimal: string, sep: string) => {
    const [whole, fraction] = v.toFixed(decimals).split('.')
    return fraction === undefined ? group(whole!, sep) : `${group(whole!, sep)}${decimal}${fraction}`
  }

  it('grouping thousands in either convention never changes the numbers read (property)', () => {
    fc.assert(fc.property(run, fc.constantFrom('area', 'height', 'both'), fc.boolean(), (rows, which, wholeAreas) => {
      const d = wholeAreas ? 0 : 1
      const table = (decimal: string, sep: string, delimiter: string, grouped: boolean) => {
        const g = (col: 'area' | 'height') => (grouped && (which === col || which === 'both') ? sep : '')
        const cell = (s: string) => (delimiter === ',' && s.includes(',') ? `"${s}"` : s)
        return [['RT [min]', 'Area', 'Height'].join(delimiter), ...rows.map((r) => [
          r.rt.toFixed(3).replace('.', decimal), cell(write(r.area, d, decimal, g('area'))), cell(write(r.height, 0, decimal, g('height'))),
        ].join(delimiter))].join('\n')
      }
      const expected = rows.map((r) => [r.rt, Number(r.area.toFixed(d)), r.height])
      for (const [decimal, sep, delimiter] of [['.', ',', ','], ['.', ',', '\t'], [',', '.', ';'], [',', ' ', ';'], ['.', '\u00a0', '\t'], ['.', '\'', ',']]) {
        for (const grouped of [false, true]) {
          const r = parsePeakTable(table(decimal!, sep!, delimiter!, grouped))
          expect(r.errors).toEqual([])
          expect(r.peaks.map((p) => [p.retentionTime, p.area, p.height])).toEqual(expected)
        }
      }
    }), { numRuns: 150 })
  })
})

describe('report footers and furniture', () => {
  const table = 'Peak   RT      Area\n1      2.514   15234.5\n2      3.087   41020.1\n'

  it.each(['*** End of Report ***', '=== End of Report ===', 'End of report', '--- end of table ---'])('skips an aligned report ending with "%s"', (footer) => {
    const r = parsePeakTable(`${table}\n${footer}\n`)
    expect(r.errors).toEqual([])
    expect(areas(r)).toEqual([15234.5, 41020.1])
  })

  it('skips printing, page, signature and summary lines after the table', () => {
    const r = parsePeakTable(`${table}\nPrinted: 2026-11-03 14:22\nPage 1 of 1\nAnalyst: ________   Date: ________\nSignature ______________\nNumber of peaks: 2\nSeite 1 von 1\n`)
    expect(r.errors).toEqual([])
    expect(areas(r)).toEqual([15234.5, 41020.1])
    expect(r.warnings).toHaveLength(6)
  })

  it('skips the same lines when a delimited export writes them as cells', () => {
    const r = parsePeakTable('RT,Area\n2.514,15234.5\n3.087,41020.1\nPage,1,of,1\n"Printed:","2026-11-03 14:22"\n"*** End of Report ***",,\n')
    expect(r.errors).toEqual([])
    expect(r.warnings).toHaveLength(3)
  })

  it('continues a table across a page break that reprints the header', () => {
    const r = parsePeakTable(`GC bay 2 report\n${table}\nPage 1 of 2\n\fGC bay 2 report\nPeak   RT      Area\n3      3.402   29871.3\n`)
    expect(r.errors).toEqual([])
    expect(areas(r)).toEqual([15234.5, 41020.1, 29871.3])
  })

  it('still refuses text between two peaks', () => {
    expect(parsePeakTable('RT,Area\n1.5,1000\nsee note,below\n2.5,2000\n').errors[0]).toMatchObject({ row: 3, code: 'non-numeric' })
    expect(parsePeakTable('Peak   RT      Area\n1      2.514   15234.5\nshoulder peak 2 3 4\n2      3.087   41020.1\n').errors[0]).toMatchObject({ row: 3 })
  })
})

describe('header spellings', () => {
  const body = (rt: string, area: string, extra = '') => `${rt};${area}${extra ? `;${extra}` : ''}\n2,514;15234,5${extra ? ';40' : ''}\n3,087;41020,1${extra ? ';60' : ''}\n`

  it.each([
    ['Retentionszeit', 'Fläche', 'Höhe'], ['Ret.Zeit [min]', 'Fläche [pA*s]', 'Höhe [pA]'], ['Temps de rétention', 'Aire', 'Hauteur'],
    ['tiempo de retención', 'área', 'altura'], ['Tempo di ritenzione', 'Area', 'Altezza'], ['Tempo de retenção', 'Área', 'Altura'],
    ['Retentietijd', 'Oppervlakte', 'Hoogte'], ['Czas retencji', 'Pole powierzchni', 'Wysokość'], ['TR', 'Aire', 'Hauteur'], ['t_R', 'Area', 'Height'],
    ['tR (min)', 'Area/µV·s', 'Height'], ['Peak RT', 'Area [µV*s]', 'Height'], ['RT', 'Area (pA*s)', 'Height'], ['RT', '"Area, mV·min"', 'Height'],
    ['RT/min', 'Area mV*s', 'Height/µV'],
  ])('reads "%s" / "%s" / "%s"', (rt, area, height) => {
    const r = parsePeakTable(body(rt, area, height))
    expect(r.errors).toEqual([])
    expect(r.peaks.map((p) => [p.retentionTime, p.area, p.height])).toEqual([[2.514, 15234.5, 40], [3.087, 41020.1, 60]])
  })

  it.each(['Area %', 'Fläche %', 'Area%', '% Area', 'Aire %', 'Área %', 'Area [%]', 'Rel. Area %', 'Oppervlakte %'])('reads "%s" as the area %%', (pct) => {
    const r = parsePeakTable(body('RT', 'Area', pct))
    expect(r.peaks.map((p) => p.areaPercent)).toEqual([40, 60])
  })

  it('does not take Name, Type, Amount or their translations for data columns', () => {
    for (const head of ['Name;RT;Type;Amount;Area', 'Nombre;TR;Tipo;Cantidad;Área', 'Nom;TR;Type;Quantité;Aire', 'Naam;Retentietijd;Type;Hoeveelheid;Oppervlakte']) {
      const r = parsePeakTable(`${head}\nA;2,514;BB;3,2;15234,5\nB;3,087;VV;4,1;41020,1\n`)
      expect(r.errors).toEqual([])
      expect(r.peaks.map((p) => [p.retentionTime, p.area])).toEqual([[2.514, 15234.5], [3.087, 41020.1]])
    }
    // "Time" in a preamble setting is not a header.
    expect(parsePeakTable('Area reject: 100   Time: 10:42\nRT,Area\n1.5,10\n').peaks).toHaveLength(1)
  })

  it('reads mm:ss retention times as minutes and seconds', () => {
    const r = parsePeakTable('RT,Area\n3:25.8,15234.5\n03:26,41020.1\n1:02:03,5\n')
    expect(r.errors).toEqual([])
    expect(rts(r)).toEqual([3 + 25.8 / 60, 3 + 26 / 60, 62 + 3 / 60].map((v) => expect.closeTo(v, 10)))
    expect(r.meta).toMatchObject({ timeUnit: 'min', timeUnitSource: 'cells' })
    expect(rts(parsePeakTable('RT;Area\n3:25,8;15234,5\n'))).toEqual([expect.closeTo(3.43, 10)])
  })

  it('uses the area % when the file has no absolute areas, and says so', () => {
    const r = parsePeakTable('Peak,RT (min),Area %\n1,2.514,40.5\n2,3.087,59.5\n')
    expect(r.errors).toEqual([])
    expect(r.peaks.map((p) => [p.area, p.areaPercent])).toEqual([[40.5, 40.5], [59.5, 59.5]])
    expect(r.meta!.areaSource).toBe('areaPercent')
    expect(r.warnings.join(' ')).toMatch(/computed from its area % column/)
    // An "Area" whose units row says "%" is an area % too.
    expect(parsePeakTable('RT,Area\nmin,%\n2.514,40.5\n3.087,59.5\n').meta!.areaSource).toBe('areaPercent')
    expect(parsePeakTable('RT,Height\n2.514,40\n').errors[0]!.code).toBe('no-area-column')
  })
})

describe('absurd numbers', () => {
  it('refuses non-finite and absurd areas and retention times with the row', () => {
    expect(parsePeakTable('RT,Area\n2.514,15234.5\n3.087,1e308\n').errors[0]).toMatchObject({ row: 3, code: 'out-of-range' })
    expect(parsePeakTable('RT,Area\n2.514,15234.5\n3.087,Infinity\n').errors[0]).toMatchObject({ row: 3, code: 'non-numeric' })
    expect(parsePeakTable('RT,Area\n2.514,NaN\n').errors[0]).toMatchObject({ row: 2, code: 'non-numeric' })
    expect(parsePeakTable('RT,Area\n2.514,1e400\n').errors[0]!.message).toMatch(/too large/)
    expect(parsePeakTable('RT [min],Area\n2.5,10\n900,20\n').errors[0]).toMatchObject({ row: 3, code: 'out-of-range' })
  })

  it('keeps a sum of the largest accepted areas finite', () => {
    const rows = Array.from({ length: 5000 }, (_, i) => `${(i + 1) / 100},1e15`)
    const r = parsePeakTable(['RT,Area', ...rows].join('\n'))
    expect(r.errors).toEqual([])
    expect(Number.isFinite(r.peaks.reduce((s, p) => s + p.area, 0))).toBe(true)
  })
})

describe('messages quote short excerpts', () => {
  it('cuts a long cell to 40 characters with an ellipsis', () => {
    const long = 'x'.repeat(200)
    const message = parsePeakTable(`RT,Area\n2.5,${long}\n`).errors[0]!.message
    const quoted = /"([^"]*)"/.exec(message)![1]!
    expect(quoted.length).toBeLessThanOrEqual(40)
    expect(quoted.endsWith('…')).toBe(true)
    expect(message).not.toContain(long)
  })
})

describe('traces', () => {
  const rows = (f: (i: number) => string) => Array.from({ length: 300 }, (_, i) => f(i))

  it('reads headers in other languages and decimal commas', () => {
    const r = parseTrace(['Zeit [s];Signal [pA]', ...rows((i) => `${(i / 10).toFixed(1).replace('.', ',')};${(1000 + i).toString()},5`)].join('\n'))
    expect(r.errors).toEqual([])
    expect(r.meta).toMatchObject({ timeUnit: 's', decimalMark: ',' })
    expect(r.signal[2]).toBe(1002.5)
  })

  it('refuses a signal beyond any detector with its row', () => {
    const lines = ['Time,Signal', ...rows((i) => `${i / 100},${i}`)]
    lines[40] = '0.39,1e300'
    expect(parseTrace(lines.join('\n')).errors[0]).toMatchObject({ row: 41, code: 'out-of-range' })
  })
})
