// Peak picking and integration of a raw detector trace.
//
// Method (documented here because no package does all of it for GC traces):
// 1. Noise σ from the median absolute deviation of first differences (robust to peaks).
// 2. Moving-average smoothing (running sums, O(n)); the width is set from the peaks found in a
//    first pass, to about a quarter of their median width at half height.
// 3. Baseline: blocks of the trace, each reduced to the mean (time, signal) of its points not
//    inside a peak; linear interpolation between blocks. Points are marked as peak where the
//    smoothed signal stands thresholdSigma noise SDs above the baseline, widened until it returns
//    to the baseline plus a margin; four rounds of mask-then-refit. Means (not minima) keep the
//    baseline unbiased under noise.
// 4. Each peak region gets a straight baseline fitted by least squares to the baseline points
//    just outside it, which follows a sloping baseline exactly.
// 5. Apexes are local maxima of the smoothed signal with a prominence over the threshold;
//    neighbours in one region are split by a perpendicular drop at the valley. Areas are
//    trapezoid sums of the raw signal minus the baseline, so smoothing never changes them.
// 6. Overlap: each apex's Gaussian-equivalent width (from its outer half width) predicts how much
//    of it lies beyond the drop line; above overlapTolerance the pair is flagged `overlap`.
//
// Why no peak-picking package for the apexes (ml-gsd was declared once and never used, and was
// removed): it finds peaks on the whole signal from the second derivative of a Savitzky-Golay
// filter, with its own noise and width rules. Here an apex must sit inside a baseline-corrected
// peak region of step 3 and clear the same noise-SD threshold that drew the region; keeping that
// rule with a package would mean mapping its peaks back onto our regions and thresholds, so the
// selection would still be written here. The local-maximum search itself (`apexes`) is twenty
// lines; steps 3, 4 and 6 (baseline, drop lines, overlap) are what no package does.
import type { Peak } from './peak-table'

export interface Trace {
  /** Minutes, strictly increasing. */
  time: ArrayLike<number>
  signal: ArrayLike<number>
}

export interface DetectPeaksOptions {
  /** Odd moving-average width in points; default chosen from the data. */
  smoothingPoints?: number
  /** Apex height above baseline, in noise SDs of the smoothed signal. Default 5. */
  thresholdSigma?: number
  minHeight?: number
  minArea?: number
  /** Largest estimated share of a peak's area misplaced by the perpendicular drop. Default 0.01. */
  overlapTolerance?: number
}

export interface DetectedPeak extends Peak {
  height: number
  startTime: number
  endTime: number
  widthAtHalfHeight: number | null
  overlapped: boolean
}

export interface DetectionFlag {
  code: 'overlap' | 'no-peaks'
  message: string
  severity: 'warning' | 'info'
  retentionTimes: number[]
}

export interface DetectPeaksResult {
  peaks: DetectedPeak[]
  flags: DetectionFlag[]
  /** Noise SD of the raw signal. */
  noise: number
  smoothingPoints: number
}

export class TraceError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'TraceError'
  }
}

const odd = (v: number) => { const r = Math.max(1, Math.round(v)); return r % 2 === 1 ? r : r + 1 }

/**
 * The k-th smallest of `a` (0-based), partly reordering `a`: Wirth's selection with a
 * median-of-three pivot, O(n) on average. Afterwards a[0..k-1] <= a[k] <= a[k+1..].
 */
function selectKth(a: Float64Array, k: number): number {
  let lo = 0
  let hi = a.length - 1
  while (lo < hi) {
    const x = medianOfThree(a[lo]!, a[k]!, a[hi]!)
    let i = lo
    let j = hi
    do {
      while (a[i]! < x) i++
      while (x < a[j]!) j--
      if (i <= j) {
        const swap = a[i]!
        a[i] = a[j]!
        a[j] = swap
        i++
        j--
      }
    } while (i <= j)
    if (j < k) lo = i
    if (k < i) hi = j
  }
  return a[k]!
}

const medianOfThree = (a: number, b: number, c: number) => Math.max(Math.min(a, b), Math.min(Math.max(a, b), c))

// A 100,000-point trace takes a dozen medians of the whole signal: selecting the middle value
// instead of sorting every copy was half of the detection's time. NaN has no place in an order,
// so a copy holding one is sorted as before (NaN last).
function median(values: Float64Array): number {
  return medianInPlace(Float64Array.from(values))
}

/**
 * The median of a scratch array the caller no longer needs in its order (the values stay, their
 * order does not): no copy. A median does not depend on the order, so a second median of values
 * computed from the reordered array is the same as from the original.
 */
function medianInPlace(s: Float64Array): number {
  if (s.length === 0) return 0
  const m = s.length >> 1
  if (hasNaN(s)) {
    s.sort()
    return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2
  }
  const upper = selectKth(s, m)
  if (s.length % 2) return upper
  let lower = s[0]!
  for (let i = 1; i < m; i++) if (s[i]! > lower) lower = s[i]!
  return (lower + upper) / 2
}

function hasNaN(s: Float64Array): boolean {
  for (let i = 0; i < s.length; i++) if (s[i] !== s[i]) return true
  return false
}

function noiseSd(y: Float64Array): number {
  const d = new Float64Array(y.length - 1)
  for (let i = 1; i < y.length; i++) d[i - 1] = y[i]! - y[i - 1]!
  const md = medianInPlace(d)
  for (let i = 0; i < d.length; i++) d[i] = Math.abs(d[i]! - md)
  return (1.4826 * medianInPlace(d)) / Math.SQRT2
}

function movingAverage(y: Float64Array, w: number): Float64Array {
  const n = y.length
  const out = new Float64Array(n)
  const half = (w - 1) >> 1
  const cum = new Float64Array(n + 1)
  for (let i = 0; i < n; i++) cum[i + 1] = cum[i]! + y[i]!
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - half)
    const b = Math.min(n, i + half + 1)
    out[i] = (cum[b]! - cum[a]!) / (b - a)
  }
  return out
}

/** Peak mask: points above thr, widened to where the residual returns to zero plus a margin. */
function buildMask(r: Float64Array, thr: number, w: number): Uint8Array {
  const n = r.length
  const mask = new Uint8Array(n)
  for (let i = 0; i < n;) {
    if (r[i]! <= thr) { i++; continue }
    let a = i
    let b = i
    while (b + 1 < n && r[b + 1]! > thr) b++
    const core = b - a + 1
    const reach = 3 * core + 2 * w
    let left = a
    while (left > 0 && r[left - 1]! > 0 && a - left < reach) left--
    let right = b
    while (right + 1 < n && r[right + 1]! > 0 && right - b < reach) right++
    const margin = Math.max(w, Math.round(0.3 * core))
    a = Math.max(0, left - margin)
    b = Math.min(n - 1, right + margin)
    for (let k = a; k <= b; k++) mask[k] = 1
    i = Math.max(i + 1, right + 1)
  }
  return mask
}

function blockBaseline(t: Float64Array, y: Float64Array, mask: Uint8Array | null, blockLen: number): Float64Array {
  const n = y.length
  const cx: number[] = []
  const cy: number[] = []
  for (let start = 0; start < n; start += blockLen) {
    const end = Math.min(n, start + blockLen)
    if (!mask) {
      cx.push(t[(start + end - 1) >> 1]!)
      cy.push(median(y.subarray(start, end)))
      continue
    }
    let st = 0; let sy = 0; let c = 0
    for (let i = start; i < end; i++) if (!mask[i]) { st += t[i]!; sy += y[i]!; c++ }
    if (c >= Math.max(3, 0.1 * (end - start))) { cx.push(st / c); cy.push(sy / c) }
  }
  const b = new Float64Array(n)
  if (cx.length === 0) return b.fill(median(y))
  if (cx.length === 1) return b.fill(cy[0]!)
  let k = 0
  for (let i = 0; i < n; i++) {
    while (k < cx.length - 2 && t[i]! > cx[k + 1]!) k++
    const slope = (cy[k + 1]! - cy[k]!) / (cx[k + 1]! - cx[k]!)
    b[i] = cy[k]! + slope * (t[i]! - cx[k]!)
  }
  return b
}

function runsOf(mask: Uint8Array): [number, number][] {
  const runs: [number, number][] = []
  for (let i = 0; i < mask.length;) {
    if (!mask[i]) { i++; continue }
    let j = i
    while (j + 1 < mask.length && mask[j + 1]) j++
    runs.push([i, j])
    i = j + 1
  }
  return runs
}

/** Least-squares line through the baseline points on both sides of a region. */
function regionLine(t: Float64Array, y: Float64Array, mask: Uint8Array, a: number, b: number, k: number, fallback: Float64Array) {
  let sx = 0; let sy = 0; let sxx = 0; let sxy = 0; let c = 0; let left = 0; let right = 0
  const take = (i: number) => { const x = t[i]! - t[a]!; sx += x; sy += y[i]!; sxx += x * x; sxy += x * y[i]!; c++ }
  for (let i = a - 1; i >= 0 && left < k && !mask[i]; i--) { take(i); left++ }
  for (let i = b + 1; i < y.length && right < k && !mask[i]; i++) { take(i); right++ }
  const det = c * sxx - sx * sx
  if (left < 3 || right < 3 || det <= 0) return (i: number) => fallback[i]!
  const slope = (c * sxy - sx * sy) / det
  const icpt = (sy - slope * sx) / c
  return (i: number) => icpt + slope * (t[i]! - t[a]!)
}

function erfc(x: number): number {
  // Abramowitz & Stegun 7.1.26, |error| < 1.5e-7.
  const z = Math.abs(x)
  const u = 1 / (1 + 0.3275911 * z)
  const poly = u * (0.254829592 + u * (-0.284496736 + u * (1.421413741 + u * (-1.453152027 + u * 1.061405429))))
  const r = poly * Math.exp(-z * z)
  return x >= 0 ? r : 2 - r
}
const upperTail = (z: number) => 0.5 * erfc(z / Math.SQRT2)

function apexes(rs: Float64Array, a: number, b: number, thr: number): number[] {
  let cand: number[] = []
  for (let i = Math.max(a, 1); i <= Math.min(b, rs.length - 2); i++) {
    if (rs[i]! > thr && rs[i]! >= rs[i - 1]! && rs[i]! > rs[i + 1]!) cand.push(i)
  }
  let merged = true
  while (merged && cand.length > 1) {
    merged = false
    for (let j = 0; j + 1 < cand.length; j++) {
      const p = cand[j]!; const q = cand[j + 1]!
      let v = p
      for (let i = p; i <= q; i++) if (rs[i]! < rs[v]!) v = i
      if (Math.min(rs[p]!, rs[q]!) - rs[v]! < thr) {
        cand = cand.filter((_, idx) => idx !== (rs[p]! >= rs[q]! ? j + 1 : j))
        merged = true
        break
      }
    }
  }
  return cand
}

function halfCrossing(t: Float64Array, rs: Float64Array, apex: number, limit: number, dir: 1 | -1): number | null {
  const half = rs[apex]! / 2
  for (let i = apex; dir === 1 ? i < limit : i > limit; i += dir) {
    const j = i + dir
    if (rs[j]! <= half) return t[i]! + ((rs[i]! - half) / (rs[i]! - rs[j]!)) * (t[j]! - t[i]!)
  }
  return null
}

interface RawPeak { apex: number, from: number, to: number, line: (i: number) => number }

export function detectPeaks(trace: Trace, options: DetectPeaksOptions = {}): DetectPeaksResult {
  const n = trace?.time?.length ?? 0
  if (n !== (trace?.signal?.length ?? -1)) throw new TraceError('The time and signal columns have different lengths.')
  if (n < 10) throw new TraceError('A trace needs at least 10 points.')
  const t = Float64Array.from(trace.time)
  const y = Float64Array.from(trace.signal)
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(t[i]!) || !Number.isFinite(y[i]!)) throw new TraceError(`Point ${i + 1} of the trace is not a number.`)
    if (i > 0 && !(t[i]! > t[i - 1]!)) throw new TraceError(`The time does not increase at point ${i + 1}.`)
  }
  const k = options.thresholdSigma ?? 5
  let range = 0
  for (let i = 0; i < n; i++) range = Math.max(range, Math.abs(y[i]! - y[0]!))
  const noise = Math.max(noiseSd(y), 1e-9 * range, Number.MIN_VALUE)
  let w = odd(options.smoothingPoints ?? Math.max(3, n / 2000))
  let pass = pickPeaks(t, y, w, noise, k)
  if (options.smoothingPoints === undefined && pass.widths.length) {
    const widthPts = median(Float64Array.from(pass.widths))
    const better = odd(Math.min(Math.max(3, widthPts / 4), n / 20))
    if (Math.abs(better - w) > 0.3 * w) { w = better; pass = pickPeaks(t, y, w, noise, k) }
  }
  return integrate(t, y, pass, w, noise, options)
}

function pickPeaks(t: Float64Array, y: Float64Array, w: number, noise: number, k: number) {
  const n = y.length
  const s = movingAverage(y, w)
  const blockLen = Math.max(20, Math.round(n / 100))
  let sigmaS = noise / Math.sqrt(w)
  let base = blockBaseline(t, s, null, blockLen)
  let mask: Uint8Array = new Uint8Array(n)
  const r = new Float64Array(n)
  for (let round = 0; round < 4; round++) {
    for (let i = 0; i < n; i++) r[i] = s[i]! - base[i]!
    mask = buildMask(r, k * sigmaS, w)
    base = blockBaseline(t, y, mask, blockLen)
    let free = 0
    for (let i = 0; i < n; i++) if (!mask[i]) r[free++] = s[i]! - base[i]!
    if (free > 20) {
      const f = r.slice(0, free)
      const m = medianInPlace(f)
      for (let i = 0; i < f.length; i++) f[i] = Math.abs(f[i]! - m)
      sigmaS = Math.max(sigmaS * 0.5, 1.4826 * medianInPlace(f))
    }
  }
  const raw: RawPeak[] = []
  const widths: number[] = []
  const thr = k * sigmaS
  const rs = r
  for (const [a, b] of runsOf(mask)) {
    const line = regionLine(t, y, mask, a, b, Math.max(2 * w, Math.min(blockLen, b - a + 1)), base)
    for (let i = a; i <= b; i++) rs[i] = s[i]! - line(i)
    const tops = apexes(rs, a, b, thr)
    tops.forEach((apex, j) => {
      let from = a
      let to = b
      if (j > 0) { from = tops[j - 1]!; for (let i = tops[j - 1]!; i <= apex; i++) if (rs[i]! < rs[from]!) from = i }
      if (j + 1 < tops.length) { to = apex; for (let i = apex; i <= tops[j + 1]!; i++) if (rs[i]! < rs[to]!) to = i }
      raw.push({ apex, from, to, line })
      let l = apex; while (l > from && rs[l]! > rs[apex]! / 2) l--
      let q = apex; while (q < to && rs[q]! > rs[apex]! / 2) q++
      widths.push(q - l)
    })
  }
  return { raw, s, widths, sigmaS }
}

interface Measured extends DetectedPeak { leftHalf: number | null, rightHalf: number | null }

function measure(t: Float64Array, y: Float64Array, s: Float64Array, rs: Float64Array, p: RawPeak, w: number): Measured {
  let area = 0
  for (let i = p.from; i < p.to; i++) area += 0.5 * ((y[i]! - p.line(i)) + (y[i + 1]! - p.line(i + 1))) * (t[i + 1]! - t[i]!)
  for (let i = p.from; i <= p.to; i++) rs[i] = s[i]! - p.line(i)
  const h = Math.max(1, (w - 1) >> 1)
  const i0 = p.apex
  const lo = Math.max(p.from, i0 - h)
  const hi = Math.min(p.to, i0 + h)
  let rt = t[i0]!
  let height = rs[i0]!
  const denom = rs[lo]! - 2 * rs[i0]! + rs[hi]!
  if (lo < i0 && hi > i0 && denom < 0) {
    // Parabola through three points h apart; d is the vertex offset in units of h.
    const d = (0.5 * (rs[lo]! - rs[hi]!)) / denom
    if (Math.abs(d) < 1) {
      rt = t[i0]! + d * (d > 0 ? t[hi]! - t[i0]! : t[i0]! - t[lo]!)
      height = rs[i0]! - 0.25 * (rs[lo]! - rs[hi]!) * d
    }
  }
  const left = halfCrossing(t, rs, i0, p.from, -1)
  const right = halfCrossing(t, rs, i0, p.to, 1)
  // Moving-average smoothing adds (w² − 1)/12 sample spacings² to a peak's variance; remove it.
  const dt = (t[p.to]! - t[p.from]!) / Math.max(1, p.to - p.from)
  const added = 2 * Math.LN2 * ((w * w - 1) / 12) * dt * dt
  const unsmooth = (half: number | null) => (half === null ? null : Math.sqrt(Math.max(half * half - added, 0.25 * half * half)))
  const leftHalf = unsmooth(left === null ? null : rt - left)
  const rightHalf = unsmooth(right === null ? null : right - rt)
  const fwhm = leftHalf !== null && rightHalf !== null
    ? leftHalf + rightHalf
    : leftHalf !== null ? 2 * leftHalf : rightHalf !== null ? 2 * rightHalf : null
  return {
    retentionTime: rt, area, height, startTime: t[p.from]!, endTime: t[p.to]!,
    widthAtHalfHeight: fwhm, overlapped: false, leftHalf, rightHalf,
  }
}

function integrate(
  t: Float64Array,
  y: Float64Array,
  pass: ReturnType<typeof pickPeaks>,
  w: number,
  noise: number,
  options: DetectPeaksOptions,
): DetectPeaksResult {
  const rs = new Float64Array(y.length)
  const measured = pass.raw.map((p) => measure(t, y, pass.s, rs, p, w))
  const flags = overlapFlags(measured, pass.raw, options.overlapTolerance ?? 0.01)
  measured.forEach((m, j) => {
    if (!hidesShoulder(pass.s, pass.raw[j]!, m, t, pass.sigmaS, options.thresholdSigma ?? 5)) return
    m.overlapped = true
    flags.push({
      code: 'overlap',
      severity: 'warning',
      retentionTimes: [m.retentionTime],
      message: `The peak at ${m.retentionTime.toFixed(2)} min has a shoulder: a second compound probably elutes with it and cannot be split from it; improve the separation before trusting its area.`,
    })
  })
  const peaks: DetectedPeak[] = measured
    .filter((p) => p.height >= (options.minHeight ?? 0) && p.area >= (options.minArea ?? 0))
    .map(({ leftHalf: _l, rightHalf: _r, ...peak }) => peak)
  if (peaks.length === 0) {
    flags.push({ code: 'no-peaks', severity: 'warning', retentionTimes: [], message: 'No peak rose clearly above the baseline noise.' })
  }
  return { peaks, flags, noise, smoothingPoints: w }
}

/**
 * Unresolved shoulders have no valley, but the second derivative still shows one negative lobe
 * per component (a single Gaussian has exactly one).
 */
function hidesShoulder(s: Float64Array, p: RawPeak, m: Measured, t: Float64Array, sigmaS: number, k: number): boolean {
  const dt = (t[p.to]! - t[p.from]!) / Math.max(1, p.to - p.from)
  const half = Math.min(m.leftHalf ?? Infinity, m.rightHalf ?? Infinity)
  if (!Number.isFinite(half) || dt <= 0) return false
  const h = Math.max(1, Math.round(half / 1.1774 / dt / 2))
  const a = Math.max(h, p.from)
  const b = Math.min(s.length - 1 - h, p.to)
  if (b - a < 4 * h) return false
  const neg = new Float64Array(s.length)
  for (let i = a; i <= b; i++) neg[i] = -(s[i + h]! - 2 * s[i]! + s[i - h]!)
  return apexes(neg, a + 1, b - 1, k * sigmaS * Math.sqrt(6)).length > 1
}

function overlapFlags(peaks: Measured[], raw: RawPeak[], tolerance: number): DetectionFlag[] {
  const flags: DetectionFlag[] = []
  const sd = (half: number | null, other: number | null, p: Measured) => (half ?? other ?? (p.endTime - p.startTime) / 6) / 1.1774
  for (let j = 0; j + 1 < peaks.length; j++) {
    if (raw[j]!.to !== raw[j + 1]!.from) continue
    const a = peaks[j]!
    const b = peaks[j + 1]!
    // Outer half widths (away from the neighbour) are the least disturbed by the overlap.
    const sa = sd(a.leftHalf, a.rightHalf, a)
    const sb = sd(b.rightHalf, b.leftHalf, b)
    const drop = a.endTime
    const spillA = a.height * sa * Math.sqrt(2 * Math.PI) * upperTail((drop - a.retentionTime) / sa)
    const spillB = b.height * sb * Math.sqrt(2 * Math.PI) * upperTail((b.retentionTime - drop) / sb)
    const share = Math.max(spillA, spillB) / Math.max(Number.MIN_VALUE, Math.min(a.area, b.area))
    if (share > tolerance) {
      a.overlapped = true
      b.overlapped = true
      flags.push({
        code: 'overlap',
        severity: 'warning',
        retentionTimes: [a.retentionTime, b.retentionTime],
        message: `The peaks at ${a.retentionTime.toFixed(2)} and ${b.retentionTime.toFixed(2)} min overlap too much to split reliably (up to about ${Math.min(100, share * 100).toFixed(0)} % of the smaller one may be misassigned); improve the separation or integrate them by hand.`,
      })
    }
  }
  return flags
}
