import { describe, expect, it } from 'vitest'
import { readUploadContent, NETCDF_MEDIA_TYPE, UploadFormatError } from '../../shared/utils/lib/upload-content'
import { analyzeSubstrate } from '../../shared/utils/halogenation'
import { evaluateRun } from '../../shared/utils/submission'
import { andiTrace, type GaussianPeak } from '../support/andi-fixtures'

// From bytes to a result, for netCDF chromatograms: the engine integrates the trace the reader
// made, or takes the instrument's stored peak table. Synthetic Gaussian peaks have known areas
// (the normal density integrates to 1), so the expected mole % is their arithmetic.

const substrate = analyzeSubstrate('CCCCCl') // 1-chlorobutane: four dichlorobutanes
const products = substrate.products
// Invented windows (minutes), one per product, in the order of the products.
const windows = products.map((p, i) => ({ productSmiles: p.smiles, rtMin: 3 + i, rtMax: 3.4 + i, responseFactor: 1 }))
const chemistry = {
  products,
  windows,
  solvent: { rtMin: 1.2, rtMax: 1.6 },
  startingMaterial: null,
  predicted: products.map((p) => ({ smiles: p.smiles, percent: 25 })),
  literature: { secondaryToPrimary: 3.8, tertiaryToPrimary: null },
}
const areas = [90, 260, 170, 80]
const peaks: GaussianPeak[] = [
  { retentionTime: 1.4, area: 2000, sigma: 0.03 }, // solvent
  ...windows.map((w, i) => ({ retentionTime: w.rtMin + 0.2, area: areas[i]!, sigma: 0.025 })),
]
const expected = areas.map((a) => (100 * a) / areas.reduce((s, v) => s + v, 0))

describe('an ANDI/AIA netCDF upload', () => {
  it('a trace: integrated by detectPeaks, mole % within 0.3 points of the Gaussian areas', async () => {
    const content = await readUploadContent(andiTrace({ peaks, intervalSeconds: 0.25, points: 1800, baseline: 2, noise: 0.02, seed: 9 }))
    expect(content).toMatchObject({ format: 'netcdf', mediaType: NETCDF_MEDIA_TYPE, source: { kind: 'trace' } })
    const run = evaluateRun({ source: content.source, ...chemistry })
    expect(run.kind).toBe('trace')
    expect(run.peaks.find((p) => p.assignedTo === 'solvent')?.area).toBeCloseTo(2000, -1)
    products.forEach((p, i) => {
      expect(Math.abs(run.molePercents.find((m) => m.smiles === p.smiles)!.percent - expected[i]!)).toBeLessThan(0.3)
    })
  })

  it('a stored peak table: used as is, a peak-table run, and the warnings say where the peaks came from', async () => {
    const stored = peaks.map((p) => ({ retentionTimeSeconds: p.retentionTime * 60, area: p.area }))
    const content = await readUploadContent(andiTrace({ peaks, points: 1800, storedPeaks: stored }))
    const run = evaluateRun({ source: content.source, ...chemistry })
    expect(run.kind).toBe('peak-table')
    expect(run.warnings[0]).toMatch(/instrument's own peak table \(5 peaks\)/)
    products.forEach((p, i) => expect(run.molePercents.find((m) => m.smiles === p.smiles)!.percent).toBeCloseTo(expected[i]!, 4))
  })

  it('netCDF-4 (HDF5) and 64-bit-data netCDF are refused with what to export instead (415)', async () => {
    for (const magic of [[0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a], [0x43, 0x44, 0x46, 0x05]]) {
      const error = await readUploadContent(Uint8Array.from([...magic, ...new Array(64).fill(0)])).catch((e) => e)
      expect(error).toBeInstanceOf(UploadFormatError)
      expect(error).toMatchObject({ status: 415, message: expect.stringMatching(/ANDI\/AIA netCDF classic/) })
    }
  })

  it('a damaged netCDF file is a 422 naming netCDF', async () => {
    const good = andiTrace({ peaks, points: 1800 })
    const error = await readUploadContent(good.subarray(0, 300)).catch((e) => e)
    expect(error).toMatchObject({ status: 422, message: expect.stringMatching(/^netCDF: /) })
  })
})
