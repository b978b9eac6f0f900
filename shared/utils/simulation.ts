// Invented GC data for the demo seed, tests and benchmarks. Deterministic: the same seed always
// gives the same table or trace. No clock, no Math.random.
import type { Peak } from './lib/peak-table'

/** mulberry32: a small 32-bit seeded generator, uniform on [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** Standard normal deviates (Box–Muller) from a uniform generator. */
export function normalRandom(rng: () => number): () => number {
  let spare: number | null = null
  return () => {
    if (spare !== null) { const v = spare; spare = null; return v }
    let u = 0
    while (u === 0) u = rng()
    const v = rng()
    const r = Math.sqrt(-2 * Math.log(u))
    spare = r * Math.sin(2 * Math.PI * v)
    return r * Math.cos(2 * Math.PI * v)
  }
}

export type BadRun = 'none' | 'solvent-as-product' | 'swapped-peaks' | 'missing-product' | 'split-peak'
export type ExportStyle = 'csv' | 'semicolon-decimal-comma' | 'tab' | 'aligned' | 'csv-seconds'

export interface SimulationWindow {
  productSmiles: string
  rtMin: number
  rtMax: number
  responseFactor?: number
}

export interface SimulatePeakTableInput {
  seed: number
  windows: SimulationWindow[]
  /** True mole % per product SMILES (need not sum to 100). */
  distribution: { smiles: string, percent: number }[]
  totalProductArea?: number
  /** Relative SD of the multiplicative area noise (log-normal). Default 0.02. */
  areaNoise?: number
  /** SD of the retention-time jitter as a share of the window half-width. Default 0.15. */
  rtJitter?: number
  solvent?: { retentionTime: number, area: number }
  startingMaterial?: { retentionTime: number, area: number }
  extraPeaks?: { retentionTime: number, area: number }[]
  fault?: BadRun
  /** Which product the fault hits (index into windows); default chosen by the seed. */
  faultProduct?: number
  style?: ExportStyle
  includeAreaPercent?: boolean
}

export interface SimulatedPeakTable {
  text: string
  /** The peaks written, retention time in minutes, in elution order. */
  peaks: Peak[]
  fault: BadRun
  style: ExportStyle
}

const centre = (w: SimulationWindow) => (w.rtMin + w.rtMax) / 2
const halfWidth = (w: SimulationWindow) => (w.rtMax - w.rtMin) / 2

function productPeaks(input: SimulatePeakTableInput, gauss: () => number): Peak[][] {
  const total = input.totalProductArea ?? 100_000
  const cv = input.areaNoise ?? 0.02
  const jitter = input.rtJitter ?? 0.15
  const sum = input.distribution.reduce((s, d) => s + d.percent, 0) || 1
  return input.windows.map((w) => {
    const pct = input.distribution.find((d) => d.smiles === w.productSmiles)?.percent ?? 0
    const offset = Math.max(-0.7, Math.min(0.7, gauss() * jitter)) * halfWidth(w)
    const area = (pct / sum) * total * (w.responseFactor ?? 1) * Math.exp(gauss() * cv - (cv * cv) / 2)
    return area > 0 ? [{ retentionTime: centre(w) + offset, area }] : []
  })
}

function applyFault(perWindow: Peak[][], input: SimulatePeakTableInput, rng: () => number, others: Peak[]): Peak[][] {
  const fault = input.fault ?? 'none'
  const n = input.windows.length
  const pick = input.faultProduct ?? Math.floor(rng() * n)
  const out = perWindow.map((list) => list.map((p) => ({ ...p })))
  if (fault === 'missing-product') out[pick] = []
  if (fault === 'swapped-peaks' && n > 1) {
    const other = (pick + 1) % n
    const a = out[pick]![0]; const b = out[other]![0]
    if (a && b) [a.area, b.area] = [b.area, a.area]
  }
  if (fault === 'split-peak' && out[pick]![0]) {
    const p = out[pick]![0]!
    const w = input.windows[pick]!
    const shift = 0.25 * halfWidth(w)
    out[pick] = [
      { retentionTime: Math.max(w.rtMin, p.retentionTime - shift), area: p.area * 0.6 },
      { retentionTime: Math.min(w.rtMax, p.retentionTime + shift), area: p.area * 0.4 },
    ]
  }
  if (fault === 'solvent-as-product') {
    // The solvent co-elutes inside a product window, so nothing sits in the solvent window.
    const solventIdx = others.findIndex((p) => p.area === input.solvent?.area)
    const area = input.solvent?.area ?? 20 * perWindow.flat().reduce((s, p) => s + p.area, 0)
    if (solventIdx >= 0) others.splice(solventIdx, 1)
    const w = input.windows[pick]!
    out[pick]!.push({ retentionTime: centre(w) - 0.4 * halfWidth(w), area })
  }
  return out
}

/** A product-mixture peak table as an export file, optionally with one of the classic bad runs. */
export function simulatePeakTable(input: SimulatePeakTableInput): SimulatedPeakTable {
  const rng = mulberry32(input.seed)
  const gauss = normalRandom(rng)
  const others: Peak[] = []
  if (input.solvent) others.push({ ...input.solvent })
  if (input.startingMaterial) others.push({ ...input.startingMaterial })
  for (const p of input.extraPeaks ?? []) others.push({ ...p })
  const perWindow = applyFault(productPeaks(input, gauss), input, rng, others)
  const peaks = [...perWindow.flat(), ...others].sort((a, b) => a.retentionTime - b.retentionTime)
  const total = peaks.reduce((s, p) => s + p.area, 0)
  for (const p of peaks) {
    p.areaPercent = (p.area / total) * 100
    p.height = p.area / (0.03 * Math.sqrt(2 * Math.PI) * 60)
  }
  const style = input.style ?? 'csv'
  return { text: formatPeakTable(peaks, style, input.includeAreaPercent ?? true), peaks, fault: input.fault ?? 'none', style }
}

const fixed = (v: number, d: number, comma = false) => (comma ? v.toFixed(d).replace('.', ',') : v.toFixed(d))

/** Writes peaks in one of a few invented export styles. */
export function formatPeakTable(peaks: Peak[], style: ExportStyle, includeAreaPercent = true): string {
  const pct = (p: Peak, comma = false) => fixed(p.areaPercent ?? 0, 3, comma)
  const rows = peaks.map((p, i) => ({ i: i + 1, p }))
  switch (style) {
    case 'semicolon-decimal-comma':
      return [
        'Sample;simulated run', '',
        `No.;Ret. Time [min];Area${includeAreaPercent ? ';Area %' : ''}`,
        ...rows.map(({ i, p }) => [
          i, fixed(p.retentionTime, 3, true), fixed(p.area, 1, true), ...(includeAreaPercent ? [pct(p, true)] : []),
        ].join(';')),
      ].join('\r\n')
    case 'tab':
      return [
        `Peak\tRetention Time\tPeak Area${includeAreaPercent ? '\tArea Pct' : ''}\tHeight`,
        ...rows.map(({ i, p }) => [
          i, fixed(p.retentionTime, 3), fixed(p.area, 2), ...(includeAreaPercent ? [pct(p)] : []), fixed(p.height ?? 0, 1),
        ].join('\t')),
      ].join('\n')
    case 'aligned': {
      const head = `${'#'.padStart(4)}  ${'RT [min]'.padStart(9)}  ${'Area'.padStart(12)}${includeAreaPercent ? `  ${'Area %'.padStart(8)}` : ''}`
      const sum = peaks.reduce((s, p) => s + p.area, 0)
      return [
        'Integration report (simulated)', 'Column: 30 m nonpolar, 40-200 C', '', head, '-'.repeat(head.length),
        ...rows.map(({ i, p }) => {
          const percent = includeAreaPercent ? `  ${pct(p).padStart(8)}` : ''
          return `${String(i).padStart(4)}  ${fixed(p.retentionTime, 3).padStart(9)}  ${fixed(p.area, 1).padStart(12)}${percent}`
        }),
        '-'.repeat(head.length),
        `${'Total'.padStart(4)}  ${''.padStart(9)}  ${fixed(sum, 1).padStart(12)}${includeAreaPercent ? `  ${'100.000'.padStart(8)}` : ''}`,
      ].join('\n')
    }
    case 'csv-seconds':
      return ['RT (s),Area', ...rows.map(({ p }) => `${fixed(p.retentionTime * 60, 2)},${fixed(p.area, 1)}`)].join('\n')
    default:
      return [
        `Peak,RT [min],Area${includeAreaPercent ? ',Area %' : ''}`,
        ...rows.map(({ i, p }) => [i, fixed(p.retentionTime, 4), fixed(p.area, 2), ...(includeAreaPercent ? [pct(p)] : [])].join(',')),
      ].join('\n')
  }
}

export interface SimulateTraceInput {
  seed: number
  peaks: { retentionTime: number, area: number, sigma: number }[]
  /** Minutes. */
  duration: number
  points: number
  baseline?: { offset?: number, slope?: number }
  /** SD of the white detector noise. */
  noise?: number
}

export interface SimulatedTrace {
  time: number[]
  signal: number[]
}

/** A detector trace: Gaussian peaks (area in signal·min) on a sloping baseline with white noise. */
export function simulateTrace(input: SimulateTraceInput): SimulatedTrace {
  const gauss = normalRandom(mulberry32(input.seed))
  const dt = input.duration / (input.points - 1)
  const offset = input.baseline?.offset ?? 0
  const slope = input.baseline?.slope ?? 0
  const time = new Array<number>(input.points)
  const signal = new Array<number>(input.points)
  for (let i = 0; i < input.points; i++) {
    const t = i * dt
    let v = offset + slope * t + (input.noise ?? 0) * gauss()
    for (const p of input.peaks) {
      const z = (t - p.retentionTime) / p.sigma
      if (z > -12 && z < 12) v += (p.area / (p.sigma * Math.sqrt(2 * Math.PI))) * Math.exp(-0.5 * z * z)
    }
    time[i] = t
    signal[i] = v
  }
  return { time, signal }
}

/** A trace as two-column text; `seconds` writes the time in s, `decimalComma` uses ';' and ','. */
export function formatTrace(trace: SimulatedTrace, options: { seconds?: boolean, decimalComma?: boolean, header?: boolean } = {}): string {
  const sep = options.decimalComma ? ';' : ','
  const num = (v: number, d: number) => (options.decimalComma ? v.toFixed(d).replace('.', ',') : v.toFixed(d))
  const lines = options.header === false ? [] : [`Time ${options.seconds ? '(s)' : '(min)'}${sep}Signal (pA)`]
  for (let i = 0; i < trace.time.length; i++) {
    lines.push(`${num(trace.time[i]! * (options.seconds ? 60 : 1), 5)}${sep}${num(trace.signal[i]!, 4)}`)
  }
  return lines.join('\n')
}
