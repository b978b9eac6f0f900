import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { NetCDFReader } from 'netcdfjs'
import { AndiFileError, readAndiChromatogram } from '../../shared/utils/lib/andi'
import { detectPeaks } from '../../shared/utils/chromatography'
import { writeNetcdf } from '../support/netcdf-writer'
import { andiTrace, type GaussianPeak } from '../support/andi-fixtures'

// ANDI/AIA chromatograms (ASTM E1947 on netCDF classic). Fixtures come from our own writer
// (tests/support/netcdf-writer.ts); the writer is checked against netcdfjs, a reader we did not
// write. Synthetic peaks are Gaussians, whose area is known exactly: ∫ A/(σ√(2π)) e^(−(t−μ)²/2σ²) dt = A
// (the normal density integrates to 1).

const peaks: GaussianPeak[] = [
  { retentionTime: 2.0, area: 150, sigma: 0.02 },
  { retentionTime: 3.5, area: 600, sigma: 0.025 },
  { retentionTime: 4.4, area: 250, sigma: 0.03 },
]

describe('the netCDF classic writer used for fixtures', () => {
  it('writes what an independent reader (netcdfjs) reads back: dimensions, attributes, scalars, arrays and text', () => {
    const bytes = writeNetcdf({
      dimensions: { n: 3, len: 4 },
      attributes: { retention_unit: 'Seconds', scale: 2.5 },
      variables: [
        { name: 'one', type: 'double', dimensions: [], data: [42.25] },
        { name: 'values', type: 'float', dimensions: ['n'], data: [1.5, -2, 3.25] },
        { name: 'counts', type: 'short', dimensions: ['n'], data: [1, 2, 3] },
        { name: 'labels', type: 'char', dimensions: ['n', 'len'], data: 'ab\0\0cd\0\0ef\0\0' },
      ],
    })
    const nc = new NetCDFReader(bytes)
    expect(nc.version).toBe('classic format')
    expect(nc.dimensions).toEqual([{ name: 'n', size: 3 }, { name: 'len', size: 4 }])
    expect(nc.getAttribute('retention_unit')).toBe('Seconds')
    expect(nc.getAttribute('scale')).toBe(2.5)
    expect(nc.getDataVariable('one')).toEqual([42.25])
    expect(nc.getDataVariable('values')).toEqual([1.5, -2, 3.25])
    expect((nc.getDataVariable('counts') as number[]).slice(0, 3)).toEqual([1, 2, 3])
  })
})

describe('readAndiChromatogram: a trace', () => {
  it('builds the time axis from the delay and sampling interval in seconds, in minutes', () => {
    const content = readAndiChromatogram(andiTrace({ peaks, intervalSeconds: 0.2, delaySeconds: 30, points: 1500 }))
    expect(content.kind).toBe('trace')
    if (content.kind !== 'trace') return
    expect(content.time).toHaveLength(1500)
    expect(content.time[0]).toBeCloseTo(0.5, 9) // 30 s
    expect(content.time[1]! - content.time[0]!).toBeCloseTo(0.2 / 60, 9)
    expect(content.time.at(-1)).toBeCloseTo((30 + 1499 * 0.2) / 60, 6)
  })

  it('integrates to the known Gaussian areas (within 1 %) and finds their retention times', () => {
    const content = readAndiChromatogram(andiTrace({ peaks, intervalSeconds: 0.2, points: 1800, baseline: 5, noise: 0.05, seed: 3 }))
    if (content.kind !== 'trace') throw new Error('expected a trace')
    const found = detectPeaks({ time: content.time, signal: content.signal }).peaks
    expect(found).toHaveLength(peaks.length)
    peaks.forEach((p, i) => {
      expect(Math.abs(found[i]!.area - p.area) / p.area).toBeLessThan(0.01)
      expect(Math.abs(found[i]!.retentionTime - p.retentionTime)).toBeLessThan(0.005)
    })
  })

  it('reads minutes, and per-point times (raw_data_retention), to the same trace', () => {
    const seconds = readAndiChromatogram(andiTrace({ peaks, points: 1800 }))
    const minutes = readAndiChromatogram(andiTrace({ peaks, points: 1800, unit: 'Minutes' }))
    const explicit = readAndiChromatogram(andiTrace({ peaks, points: 1800, explicitTimes: true }))
    for (const other of [minutes, explicit]) {
      if (other.kind !== 'trace' || seconds.kind !== 'trace') throw new Error('expected traces')
      expect(other.time.length).toBe(seconds.time.length)
      other.time.forEach((t, i) => expect(t).toBeCloseTo(seconds.time[i]!, 5))
    }
  })

  it('assumes seconds, with a warning, when the file names no unit', () => {
    const content = readAndiChromatogram(andiTrace({ peaks, points: 1800, unit: null }))
    expect(content.warnings.join(' ')).toMatch(/seconds were assumed/)
  })
})

describe('readAndiChromatogram: a stored peak table', () => {
  const stored = [
    { retentionTimeSeconds: 120, area: 150, height: 30, name: 'solvent' },
    { retentionTimeSeconds: 210, area: 600, name: 'product a' },
    { retentionTimeSeconds: 264, area: 250, height: 12 },
  ]

  it('is used instead of integrating, times in minutes, and the warnings say so', () => {
    const content = readAndiChromatogram(andiTrace({ peaks, points: 1800, storedPeaks: stored }))
    expect(content.kind).toBe('peaks')
    if (content.kind !== 'peaks') return
    expect(content.peaks.map((p) => p.retentionTime)).toEqual([2, 3.5, 4.4].map((m) => expect.closeTo(m, 5)))
    expect(content.peaks.map((p) => p.area)).toEqual([150, 600, 250])
    // -9999 is the template's "no value": the second peak has no height.
    expect(content.peaks.map((p) => p.height)).toEqual([30, undefined, 12])
    expect(content.warnings[0]).toMatch(/instrument's own peak table \(3 peaks\)/)
  })

  it('refuses a peak without an area (-9999), naming the peak', () => {
    const bad = stored.map((p, i) => (i === 1 ? { ...p, area: -9999 } : p))
    try {
      readAndiChromatogram(andiTrace({ peaks, points: 1800, storedPeaks: bad }))
      expect.unreachable()
    } catch (error) {
      expect(error).toBeInstanceOf(AndiFileError)
      expect((error as AndiFileError).rows).toEqual([expect.objectContaining({ row: 2, message: expect.stringMatching(/^Peak 2 .*area is missing/) })])
    }
  })
})

describe('readAndiChromatogram: damaged files are refused with a sentence, never a crash or a hang', () => {
  const good = andiTrace({ peaks, points: 600 })

  it('a file cut inside its header or its data', () => {
    expect(() => readAndiChromatogram(good.subarray(0, 40))).toThrow(AndiFileError)
    expect(() => readAndiChromatogram(good.subarray(0, good.length - 100))).toThrow(/cut short/)
  })

  it('a file with no trace and no peak table', () => {
    const bytes = writeNetcdf({ dimensions: { n: 2 }, attributes: { retention_unit: 'Seconds' }, variables: [{ name: 'other', type: 'float', dimensions: ['n'], data: [1, 2] }] })
    expect(() => readAndiChromatogram(bytes)).toThrow(/neither a detector trace/)
  })

  it('a time unit it does not know', () => {
    const bytes = writeNetcdf({ dimensions: { point_number: 20 }, attributes: { retention_unit: 'fortnights' }, variables: [
      { name: 'actual_sampling_interval', type: 'float', dimensions: [], data: [1] },
      { name: 'ordinate_values', type: 'float', dimensions: ['point_number'], data: Array.from({ length: 20 }, (_, i) => i) },
    ] })
    expect(() => readAndiChromatogram(bytes)).toThrow(/not seconds or minutes/)
  })

  it('any truncation or corrupted byte either reads or throws AndiFileError (property)', () => {
    fc.assert(fc.property(
      fc.integer({ min: 4, max: good.length }),
      fc.array(fc.record({ at: fc.nat(), value: fc.integer({ min: 0, max: 255 }) }), { maxLength: 6 }),
      (length, flips) => {
        const bytes = good.slice(0, length)
        for (const f of flips) bytes[f.at % bytes.length] = f.value
        try {
          readAndiChromatogram(bytes)
        } catch (error) {
          if (!(error instanceof AndiFileError)) throw error
        }
      },
    ), { numRuns: 300 })
  })
})
