import { describe, expect, it } from 'vitest'
import { analyzeSubstrate, predictDistribution } from '../../shared/utils/halogenation'
import { formatTrace, simulatePeakTable, simulateTrace } from '../../shared/utils/simulation'
import { evaluateRun, type RunInput } from '../../shared/utils/submission'
import { packPeaks, unpackPeaks, type StoredPeak } from '../../shared/utils/lib/stored-peaks'
import { pack as migrationPack, unpack as migrationUnpack } from '../../server/database/migrations/2026_12_03_1900_packed_peaks'

// The packed peaks must read back as the JSON they replaced read back (JSON.parse of
// JSON.stringify, what the jsonb column gave): the same numbers to the last bit, the same labels,
// the same fields present. Peaks from the engines themselves, on simulated runs of 1-chlorobutane
// (Cl2/light, 1 : 3.8 : 5.0 per H at 25 °C, NCERT Chemistry class XI worked example; the
// retention windows are the demo's invented column).
const analysis = analyzeSubstrate('CCCCCl')
const predicted = predictDistribution(analysis, { primary: 1, secondary: 3.8, tertiary: 5 })
const truth = predicted.map((p) => ({ smiles: p.smiles, percent: p.percent }))
const ranges = [[3.3, 3.55], [3.8, 4.05], [4.4, 4.65], [5.6, 5.85]] as const
const windows = analysis.products.map((p, i) => ({
  productSmiles: p.smiles, rtMin: ranges[i]![0], rtMax: ranges[i]![1], responseFactor: 1,
}))
const input = (text: string): RunInput => ({
  text,
  products: analysis.products,
  windows,
  solvent: { rtMin: 1.2, rtMax: 1.6 },
  startingMaterial: { rtMin: 2.1, rtMax: 2.45, responseFactor: 1 },
  predicted: truth,
  literature: { secondaryToPrimary: 3.8, tertiaryToPrimary: null },
})
const asJsonDid = (peaks: StoredPeak[]) => JSON.parse(JSON.stringify(peaks))

describe('packed peaks', () => {
  it('read back as their JSON did: a peak table (rows, area %, labels) and a trace (heights)', () => {
    const table = simulatePeakTable({
      seed: 3, windows, distribution: truth, areaNoise: 0.01, solvent: { retentionTime: 1.4, area: 900_000 },
      startingMaterial: { retentionTime: 2.3, area: 300_000 },
    }).text
    const fromTable = evaluateRun(input(table)).peaks
    expect(fromTable.some((p) => p.row !== undefined && p.areaPercent !== undefined)).toBe(true)
    expect(unpackPeaks(packPeaks(fromTable))).toEqual(asJsonDid(fromTable))
    const peaks = windows.map((w, i) => ({ retentionTime: (w.rtMin + w.rtMax) / 2, area: 10 + 5 * i, sigma: 0.02 }))
    const trace = simulateTrace({ seed: 5, peaks, duration: 7, points: 7000, noise: 0.05 })
    const fromTrace = evaluateRun(input(formatTrace(trace))).peaks
    expect(fromTrace.every((p) => p.height !== undefined)).toBe(true)
    expect(unpackPeaks(packPeaks(fromTrace))).toEqual(asJsonDid(fromTrace))
  })

  it('keep a value that only some peaks have on those peaks only, and awkward numbers exactly', () => {
    const peaks: StoredPeak[] = [
      { retentionTime: 0.1 + 0.2, area: 1e15, areaPercent: 33.333333333333336, assignedTo: 'ClCCCCCl' },
      { retentionTime: 5e-324, area: 0, height: 12.5, row: 7, assignedTo: null },
      { retentionTime: 599.9999999999999, area: 2 ** 53 + 2, assignedTo: 'solvent' },
      { retentionTime: 3, area: 4, row: 9, assignedTo: 'ClCCCCCl' },
    ]
    const back = unpackPeaks(packPeaks(peaks))
    expect(back).toEqual(asJsonDid(peaks))
    expect(Object.keys(back[0]!)).toEqual(['retentionTime', 'area', 'areaPercent', 'assignedTo'])
    expect(Object.keys(back[1]!)).toEqual(['retentionTime', 'area', 'height', 'row', 'assignedTo'])
  })

  it('are empty for no peaks, and read from anywhere in a larger buffer (as the database driver hands them)', () => {
    expect(packPeaks([]).length).toBe(0)
    expect(unpackPeaks(new Uint8Array(0))).toEqual([])
    const peaks: StoredPeak[] = [{ retentionTime: 1.25, area: 10, assignedTo: 'CCCCCl' }, { retentionTime: 2.5, area: 20, assignedTo: null }]
    const packed = packPeaks(peaks)
    const shifted = new Uint8Array(packed.length + 3)
    shifted.set(packed, 3)
    expect(unpackPeaks(shifted.subarray(3))).toEqual(peaks)
    expect(() => unpackPeaks(new Uint8Array([9, 0, 0, 0]))).toThrow(/unknown format 9/)
  })

  it('are written by the migration that converted the jsonb ones exactly as by the engines, and read back alike', () => {
    const solvent = { retentionTime: 1.4, area: 5e5 }
    const table = simulatePeakTable({ seed: 11, windows, distribution: truth, areaNoise: 0.02, solvent }).text
    const peaks = asJsonDid(evaluateRun(input(table)).peaks)
    const packed = packPeaks(peaks)
    expect(Buffer.compare(migrationPack(peaks), Buffer.from(packed))).toBe(0)
    expect(migrationUnpack(Buffer.from(packed))).toEqual(peaks)
    expect(migrationPack([]).length).toBe(0)
  })
})
