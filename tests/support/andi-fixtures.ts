// ANDI/AIA chromatography files for tests, written with our own netCDF classic writer. Names
// follow the AIA chromatography template (ASTM E1947): the signal `ordinate_values(point_number)`,
// the scalars `actual_sampling_interval`, `actual_delay_time`, `actual_run_time_length`, the
// global attribute `retention_unit`, and the peak table over `peak_number`.
import { mulberry32, normalRandom } from '../../shared/utils/simulation'
import { writeNetcdf, type NcVariable } from './netcdf-writer'

export interface GaussianPeak {
  /** Minutes. */
  retentionTime: number
  /** Signal × minutes: the integral of the peak over time in minutes. */
  area: number
  /** Standard deviation, minutes. */
  sigma: number
}

export interface AndiTraceOptions {
  peaks: GaussianPeak[]
  /** Seconds between points (the template's usual unit). */
  intervalSeconds?: number
  delaySeconds?: number
  points?: number
  baseline?: number
  /** Standard deviation of the added noise; 0 for none. */
  noise?: number
  seed?: number
  unit?: 'Seconds' | 'Minutes' | null
  /** Write the time of every point (raw_data_retention) instead of the interval. */
  explicitTimes?: boolean
  storedPeaks?: Array<{ retentionTimeSeconds: number, area: number, height?: number, name?: string }>
}

/** A Gaussian's value at t: area / (σ√(2π)) · exp(−(t − μ)² / 2σ²), whose integral over t is the area. */
export const gaussianAt = (p: GaussianPeak, t: number) =>
  (p.area / (p.sigma * Math.sqrt(2 * Math.PI))) * Math.exp(-((t - p.retentionTime) ** 2) / (2 * p.sigma ** 2))

export function andiTrace(o: AndiTraceOptions): Uint8Array {
  const interval = o.intervalSeconds ?? 0.2
  const delay = o.delaySeconds ?? 0
  const points = o.points ?? 3000
  const gauss = normalRandom(mulberry32(o.seed ?? 1))
  const perUnit = o.unit === 'Minutes' ? 1 / 60 : 1
  const seconds = Array.from({ length: points }, (_, i) => delay + i * interval)
  const signal = seconds.map((s) =>
    (o.baseline ?? 0) + o.peaks.reduce((sum, p) => sum + gaussianAt(p, s / 60), 0) + (o.noise ?? 0) * gauss())
  const variables: NcVariable[] = [
    { name: 'actual_sampling_interval', type: 'float', dimensions: [], data: [interval * perUnit] },
    { name: 'actual_delay_time', type: 'float', dimensions: [], data: [delay * perUnit] },
    { name: 'actual_run_time_length', type: 'float', dimensions: [], data: [points * interval * perUnit] },
    { name: 'ordinate_values', type: 'float', dimensions: ['point_number'], data: signal, attributes: { uniform_sampling_flag: o.explicitTimes ? 'N' : 'Y' } },
  ]
  if (o.explicitTimes) variables.push({ name: 'raw_data_retention', type: 'float', dimensions: ['point_number'], data: seconds.map((s) => s * perUnit) })
  const dimensions: Record<string, number> = { _30_byte_string: 30, point_number: points }
  const stored = o.storedPeaks ?? []
  if (stored.length) {
    dimensions.peak_number = stored.length
    variables.push(
      { name: 'peak_retention_time', type: 'float', dimensions: ['peak_number'], data: stored.map((p) => p.retentionTimeSeconds * perUnit) },
      { name: 'peak_area', type: 'float', dimensions: ['peak_number'], data: stored.map((p) => p.area) },
      { name: 'peak_height', type: 'float', dimensions: ['peak_number'], data: stored.map((p) => p.height ?? -9999) },
      { name: 'peak_name', type: 'char', dimensions: ['peak_number', '_30_byte_string'], data: stored.map((p) => (p.name ?? '').padEnd(30, '\0').slice(0, 30)).join('') },
    )
  }
  return writeNetcdf({
    dimensions,
    attributes: {
      dataset_completeness: 'C1+C2',
      aia_template_revision: '1.0',
      netcdf_revision: '2.3',
      ...(o.unit === null ? {} : { retention_unit: o.unit ?? 'Seconds' }),
      detector_unit: 'pA',
    },
    variables,
  })
}
